import type { PlanStatus } from '../plans/status';

export type CautionId = 'hot_chamber' | 'combustible_powder' | 'inert_gas' | 'laser' | 'media_blasting';

/** One caution as the floor card shows it: a short title, what to do, and the outside source of the advice. */
export interface Caution {
  id: CautionId;
  title: string;
  points: readonly string[];
  /** The code or standard the advice follows; the lab's own local codes and the maker's instructions come first. */
  reference: string;
}

/** Shown under every list of cautions: the card gives general guidance, not the lab's rules. */
export const CAUTION_DEFERRAL =
  "General guidance only. Your local codes and the machine maker's instructions take precedence: follow them where they differ.";

export const CAUTIONS: Readonly<Record<CautionId, Caution>> = {
  hot_chamber: {
    id: 'hot_chamber',
    title: 'Hot chamber and cake',
    points: [
      'Wear heat-resistant gloves when handling the chamber or the cake.',
      'Wait for the cooling timers, or a reading at or below the threshold, before opening or breaking out.',
    ],
    reference: "The machine maker's instructions for removal and handling temperatures",
  },
  combustible_powder: {
    id: 'combustible_powder',
    title: 'Fine combustible powder',
    points: [
      'Wear a respirator (N95 / FFP2 or better), gloves and eye protection.',
      'Keep ignition sources away from the powder, sieves and vacuums.',
      'Keep up housekeeping: no dust layers on surfaces; use the approved vacuum.',
    ],
    reference: 'In the US: NFPA 652 and NFPA 654 (combustible dust); elsewhere your local codes',
  },
  inert_gas: {
    id: 'inert_gas',
    title: 'Inert gas (nitrogen)',
    points: [
      'Nitrogen has no smell and can asphyxiate: keep the room ventilated.',
      'Watch the oxygen monitor: air below 19.5 % oxygen is oxygen-deficient.',
    ],
    reference: 'OSHA 29 CFR 1910.134 (oxygen-deficient atmosphere below 19.5 %)',
  },
  laser: {
    id: 'laser',
    title: 'Laser',
    points: ['Keep the enclosure closed and the interlocks working; never bypass them.'],
    reference: 'IEC 60825-1 (safety of laser products)',
  },
  media_blasting: {
    id: 'media_blasting',
    title: 'Media blasting',
    points: ['Wear eye and breathing protection.', 'Use a grounded nozzle and keep the cabinet closed while blasting.'],
    reference: 'OSHA 29 CFR 1910.94 (abrasive blasting)',
  },
};

const BY_STATUS: Partial<Record<PlanStatus, readonly CautionId[]>> = {
  // Loading powder and cleaning the window before the start.
  queued: ['combustible_powder', 'inert_gas', 'laser'],
  printing: ['laser', 'inert_gas', 'hot_chamber'],
  cooling: ['hot_chamber', 'inert_gas'],
  breakout: ['hot_chamber', 'combustible_powder'],
  // Removing the last powder, sieving it for reuse and blasting the parts.
  finishing: ['combustible_powder', 'media_blasting'],
};

/** The cautions of a stage, most pressing first; none outside the run's stages. */
export function stageCautions(status: PlanStatus): Caution[] {
  return (BY_STATUS[status] ?? []).map((id) => CAUTIONS[id]);
}
