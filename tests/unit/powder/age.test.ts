import { fillMeanAge, recoverIntoPool, steadyStateFillAge, takeFromPool, type ReusedPool } from '@/shared/powder';

/** One build: load `freshKg` + `reusedKg` from the pool, sieve `recoveredKg` back after breakout. */
function build(pool: ReusedPool, freshKg: number, reusedKg: number, recoveredKg: number) {
  const fillAge = fillMeanAge(freshKg, reusedKg, pool.meanAgeBuilds);
  const after = recoverIntoPool(takeFromPool(pool, reusedKg), recoveredKg, fillAge);
  return { fillAge, pool: after };
}

describe('mean age of reused powder, mixed by mass', () => {
  it('follows a hand-worked sequence of four builds', () => {
    // Worked by hand (age = heat cycles the powder has been through; fresh = 0):
    // build 1: 10 kg fresh, no reused          -> fill age 0;             recover 6 kg at 0 + 1 = 1 -> pool 6 kg, age 1
    // build 2: 4 fresh + 6 reused (age 1)      -> fill age 6*1/10 = 0.6;  pool empty; recover 6 kg at 1.6 -> pool 6 kg, age 1.6
    // build 3: 4 fresh + 6 reused (age 1.6)    -> fill age 6*1.6/10 = 0.96; recover 7 kg at 1.96 -> pool 7 kg, age 1.96
    // build 4: 5 fresh + 5 reused (age 1.96)   -> 2 kg stay at 1.96; fill age 5*1.96/10 = 0.98;
    //          recover 5 kg at 1.98            -> pool 7 kg, age (2*1.96 + 5*1.98)/7 = 13.82/7 = 1.974285714...
    let pool: ReusedPool = { massKg: 0, meanAgeBuilds: 0 };
    const steps: Array<[number, number, number, number, number, number]> = [
      // fresh, reused, recovered, expected fill age, expected pool kg, expected pool age
      [10, 0, 6, 0, 6, 1],
      [4, 6, 6, 0.6, 6, 1.6],
      [4, 6, 7, 0.96, 7, 1.96],
      [5, 5, 5, 0.98, 7, 13.82 / 7],
    ];
    for (const [fresh, reused, recovered, fillAge, poolKg, poolAge] of steps) {
      const r = build(pool, fresh, reused, recovered);
      expect(r.fillAge).toBeCloseTo(fillAge, 12);
      expect(r.pool.massKg).toBeCloseTo(poolKg, 12);
      expect(r.pool.meanAgeBuilds).toBeCloseTo(poolAge, 12);
      pool = r.pool;
    }
  });

  it.each([0.2, 0.3, 0.5, 0.7])('settles at the closed form (1 - r) / r for a constant refresh ratio r = %s', (r) => {
    // Closed form: a fill at refresh ratio r holds r of age 0, r(1 - r) of age 1, r(1 - r)^2 of age 2, ...;
    // its mean is sum k r (1 - r)^k = (1 - r) / r (the mean of a geometric distribution on 0, 1, 2, ...).
    // The pool gets back exactly what it gave (losses are made up by the fresh share), 60 kg fills.
    const fillKg = 60;
    let pool: ReusedPool = { massKg: 0, meanAgeBuilds: 0 };
    let fillAge = 0;
    // The first build is all fresh; after it the pool holds the reused share of one fill.
    ({ pool } = build(pool, fillKg, 0, fillKg * (1 - r)));
    for (let i = 0; i < 300; i++) {
      ({ fillAge, pool } = build(pool, fillKg * r, fillKg * (1 - r), fillKg * (1 - r)));
    }
    expect(fillAge).toBeCloseTo((1 - r) / r, 6);
    expect(steadyStateFillAge(r)).toBeCloseTo((1 - r) / r, 12);
    // The pool's own powder has been through one build more than the fill's reused share: 1 / r.
    expect(pool.meanAgeBuilds).toBeCloseTo(1 / r, 6);
  });

  it('agrees with tracking every age cohort separately, for irregular builds', () => {
    // An independent bookkeeping: the pool as kilograms per exact age, drawn from in proportion (well mixed).
    let seed = 12345;
    const random = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    let pool: ReusedPool = { massKg: 0, meanAgeBuilds: 0 };
    let cohorts = new Map<number, number>();
    const total = (m: Map<number, number>) => [...m.values()].reduce((a, b) => a + b, 0);
    const mean = (m: Map<number, number>) => [...m].reduce((a, [age, kg]) => a + age * kg, 0) / total(m);
    for (let i = 0; i < 40; i++) {
      const poolKg = total(cohorts);
      const reused = poolKg * random();
      const fresh = 5 + 20 * random();
      const recovered = (fresh + reused) * (0.3 + 0.6 * random());
      // cohorts: take `reused` proportionally, form the fill, recover a proportional share a build older
      const share = poolKg > 0 ? reused / poolKg : 0;
      const fill = new Map<number, number>([[0, fresh]]);
      const left = new Map<number, number>();
      for (const [age, kg] of cohorts) {
        fill.set(age, (fill.get(age) ?? 0) + kg * share);
        left.set(age, kg * (1 - share));
      }
      const back = recovered / (fresh + reused);
      for (const [age, kg] of fill) left.set(age + 1, (left.get(age + 1) ?? 0) + kg * back);
      cohorts = left;
      pool = build(pool, fresh, reused, recovered).pool;
      expect(pool.massKg).toBeCloseTo(total(cohorts), 9);
      expect(pool.meanAgeBuilds).toBeCloseTo(mean(cohorts), 9);
    }
  });

  it('keeps the age when powder leaves the pool, and forgets it when the pool is empty', () => {
    expect(takeFromPool({ massKg: 10, meanAgeBuilds: 2.5 }, 4)).toEqual({ massKg: 6, meanAgeBuilds: 2.5 });
    expect(takeFromPool({ massKg: 10, meanAgeBuilds: 2.5 }, 10)).toEqual({ massKg: 0, meanAgeBuilds: 0 });
  });
});
