import type { MovementKind } from '../../shared/powder';

export const kgText = (kg: number) => `${kg.toFixed(1)} kg`;
export const signedKg = (kg: number) => `${kg > 0 ? '+' : kg < 0 ? '−' : '±'}${Math.abs(kg).toFixed(2)} kg`;
export const ageText = (builds: number) => `${builds.toFixed(1)} build${Math.abs(builds - 1) < 0.05 ? '' : 's'}`;

/** What the screens say of a powder whose stock the lab does not keep yet (no movement recorded): unknown, not empty. */
export const untrackedText = (name: string) =>
  `The lab keeps no stock of ${name} in Sinterstack yet: builds start without a stock check. It is kept from the first lot received or count recorded.`;

export const MOVEMENT_LABELS: Record<MovementKind, string> = {
  received: 'Received',
  loaded: 'Loaded into a build',
  recovered: 'Recovered after breakout',
  discarded: 'Discarded',
  adjusted: 'Counted',
};

/** A decimal typed on a phone (comma or point); NaN when it is not a number. */
export const parseKg = (t: string) => (t.trim() === '' ? Number.NaN : Number(t.trim().replace(',', '.')));
