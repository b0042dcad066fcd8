/**
 * Age of reused powder, counted in builds (heat cycles) the powder has been
 * through, mixed by mass.
 *
 * Fresh powder has age 0. A build's fill of F kg fresh and R kg reused from a
 * pool of mean age A has the mean age (R A) / (F + R) when it goes in; every
 * grain of it then sees one more heat cycle, so the powder sieved back after
 * breakout has the fill's age plus one. Recovered powder mixes into the pool
 * by mass:
 *
 *     pool after = (M_left A + X (fill age + 1)) / (M_left + X)
 *
 * At a constant refresh ratio r = F / (F + R), with the pool getting back what
 * it gave, the fill's mean age settles at (1 - r) / r builds (a geometric
 * series: r of the fill is new, r(1 - r) has seen one build, r(1 - r)^2 two,
 * ...), and the pool itself at 1 / r.
 */

export interface ReusedPool {
  massKg: number;
  /** Mean heat cycles of the pool's powder, by mass. */
  meanAgeBuilds: number;
}

const EPS_KG = 1e-9;

/** Mean heat cycles the powder of a fill has seen before this build. */
export function fillMeanAge(freshKg: number, reusedKg: number, poolAgeBuilds: number): number {
  const total = freshKg + reusedKg;
  return total > EPS_KG ? (reusedKg * poolAgeBuilds) / total : 0;
}

/** Taking powder out of the pool (loading, discarding, a count below the book) leaves its mean age as it was. */
export function takeFromPool(pool: ReusedPool, kg: number): ReusedPool {
  const massKg = Math.max(0, pool.massKg - kg);
  return { massKg, meanAgeBuilds: massKg > EPS_KG ? pool.meanAgeBuilds : 0 };
}

/** Mixes `kg` of powder of mean age `ageBuilds` into the pool, by mass. */
export function addToPool(pool: ReusedPool, kg: number, ageBuilds: number): ReusedPool {
  const massKg = pool.massKg + kg;
  if (massKg <= EPS_KG) return { massKg: 0, meanAgeBuilds: 0 };
  return { massKg, meanAgeBuilds: (Math.max(0, pool.massKg) * pool.meanAgeBuilds + kg * ageBuilds) / massKg };
}

/** Powder sieved back after breakout: the fill's age plus the build it has just been through. */
export function recoverIntoPool(pool: ReusedPool, recoveredKg: number, fillAgeBuilds: number): ReusedPool {
  return addToPool(pool, recoveredKg, fillAgeBuilds + 1);
}

/** The fill's mean age in the steady state of a constant refresh ratio r (0 < r <= 1). */
export function steadyStateFillAge(refreshRatio: number): number {
  return (1 - refreshRatio) / refreshRatio;
}

/** Share of fresh powder in a fill. */
export function refreshRatioOf(freshKg: number, reusedKg: number): number {
  const total = freshKg + reusedKg;
  return total > EPS_KG ? freshKg / total : 1;
}
