import { KG_EPS, clean } from './stock';

export interface LotOnHand {
  id: string;
  code: string;
  /** YYYY-MM-DD */
  receivedOn: string;
  expiresOn: string | null;
  onHandKg: number;
}

export interface Draw {
  lotId: string;
  code: string;
  kg: number;
}

export interface DrawProposal {
  draws: Draw[];
  /** Fresh powder the lots on hand cannot give (0 when they cover the build). */
  shortfallKg: number;
  /** Lots passed over because they had expired by `today`. */
  skippedExpired: string[];
}

/** Lots in the order they should be used: oldest received first (first in, first out). */
export function oldestFirst<T extends Pick<LotOnHand, 'receivedOn' | 'code'>>(lots: readonly T[]): T[] {
  return [...lots].sort((a, b) => a.receivedOn.localeCompare(b.receivedOn) || a.code.localeCompare(b.code));
}

/**
 * Which fresh lots to draw `freshKg` from: oldest first, each to its end
 * before the next, expired lots passed over.
 */
export function proposeDraws(lots: readonly LotOnHand[], freshKg: number, today: string): DrawProposal {
  const draws: Draw[] = [];
  const skippedExpired: string[] = [];
  let left = freshKg;
  for (const lot of oldestFirst(lots)) {
    if (left <= KG_EPS) break;
    if (lot.onHandKg <= KG_EPS) continue;
    if (lot.expiresOn && lot.expiresOn < today) {
      skippedExpired.push(lot.code);
      continue;
    }
    const kg = clean(Math.min(lot.onHandKg, left));
    draws.push({ lotId: lot.id, code: lot.code, kg });
    left -= kg;
  }
  return { draws, shortfallKg: left > KG_EPS ? clean(left) : 0, skippedExpired };
}
