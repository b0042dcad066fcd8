import { fillMeanAge, refreshRatioOf } from './age';

/** A material's powder rules, set by the lab's leads. */
export interface PowderPolicy {
  /** Largest mean age (builds) of a build's fill before the parts' surface and strength suffer. */
  maxMeanAgeBuilds: number;
  /** Smallest share of fresh powder in a fill. */
  minRefreshRatio: number;
  /** Lowest melt volume-rate (cm^3 / 10 min) the reused powder may show; null: no threshold set. */
  minMvrCm3Per10Min: number | null;
  /** Fresh stock below which powder is reordered. */
  reorderLevelKg: number;
  /** Days from an order to the powder on the shelf. */
  leadTimeDays: number;
}

/**
 * Until a lead sets them: a 30 % refresh (a studied nylon 12 mix, Polymers
 * 2025, 17(5):577) whose steady fill age is (1 - 0.3) / 0.3 = 2.3 builds, so a
 * ceiling of 3 builds; reorder level and lead time are the lab's own figures.
 */
export const DEFAULT_POLICY: PowderPolicy = {
  maxMeanAgeBuilds: 3,
  minRefreshRatio: 0.3,
  minMvrCm3Per10Min: null,
  reorderLevelKg: 0,
  leadTimeDays: 7,
};

export interface MeltFlowState {
  mvrCm3Per10Min: number;
  passed: boolean;
  released: boolean;
}

/** Reuse is blocked while the latest melt-flow check failed and no lead has released it. */
export function reuseBlocked(latest: MeltFlowState | null): boolean {
  return !!latest && !latest.passed && !latest.released;
}

export type BuildWarning =
  | { code: 'age'; message: string; fillAgeBuilds: number; maxMeanAgeBuilds: number }
  | { code: 'refresh'; message: string; refreshRatio: number; minRefreshRatio: number }
  | { code: 'melt_flow'; message: string };

const f1 = (n: number) => n.toFixed(1);

/** What a build of this fill would break of the material's rules (warnings: the lab decides). */
export function buildWarnings(
  fill: { freshKg: number; reusedKg: number },
  poolAgeBuilds: number,
  policy: PowderPolicy,
  latest: MeltFlowState | null,
): BuildWarning[] {
  const out: BuildWarning[] = [];
  const age = fillMeanAge(fill.freshKg, fill.reusedKg, poolAgeBuilds);
  if (age > policy.maxMeanAgeBuilds + 1e-9) {
    out.push({
      code: 'age',
      message: `The fill's powder would have seen ${f1(age)} builds on average, over this material's limit of ${f1(policy.maxMeanAgeBuilds)}: use more fresh powder.`,
      fillAgeBuilds: age,
      maxMeanAgeBuilds: policy.maxMeanAgeBuilds,
    });
  }
  const ratio = refreshRatioOf(fill.freshKg, fill.reusedKg);
  if (fill.freshKg + fill.reusedKg > 0 && ratio < policy.minRefreshRatio - 1e-9) {
    out.push({
      code: 'refresh',
      message: `Only ${Math.round(ratio * 100)} % of the fill would be fresh; this material asks for at least ${Math.round(policy.minRefreshRatio * 100)} %.`,
      refreshRatio: ratio,
      minRefreshRatio: policy.minRefreshRatio,
    });
  }
  if (fill.reusedKg > 0 && reuseBlocked(latest)) {
    out.push({
      code: 'melt_flow',
      message: `The reused powder failed its last melt-flow check (${latest!.mvrCm3Per10Min} cm³/10 min): it may not be loaded until a lead releases it.`,
    });
  }
  return out;
}
