/**
 * Transient conduction in a plane wall and a rectangular block, by the series solution
 * (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, transient conduction chapter, §5.5 and §5.8):
 *
 * a plane wall of half-thickness L, initially at T_i, whose faces meet a fluid at T_inf with a heat transfer
 * coefficient h, has
 *
 *   theta*(x*, Fo) = (T - T_inf) / (T_i - T_inf) = sum_n C_n exp(-zeta_n^2 Fo) cos(zeta_n x*),
 *   C_n = 4 sin(zeta_n) / (2 zeta_n + sin(2 zeta_n)),   zeta_n tan(zeta_n) = Bi,
 *
 * with Bi = h L / k, Fo = alpha t / L^2, x* = x / L. A block 2L1 x 2L2 x 2L3 is the product of three such walls.
 * The first term alone is within about 2 % for Fo > 0.2; the functions here sum as many terms as the Fourier
 * number needs, so they also hold just after cooling starts.
 */

/** The n-th positive root (n = 1, 2, ...) of zeta tan(zeta) = Bi; (2n - 1) pi / 2 for Bi = Infinity. */
export function slabEigenvalue(bi: number, n: number): number {
  const lo0 = (n - 1) * Math.PI;
  const hi0 = lo0 + Math.PI / 2;
  if (bi === Infinity) return hi0;
  if (bi <= 0) return lo0;
  // f(z) = z sin z - Bi cos z changes sign once on ((n - 1) pi, (n - 1) pi + pi / 2].
  const f = (z: number) => z * Math.sin(z) - bi * Math.cos(z);
  let lo = lo0;
  let hi = hi0;
  const fLo = f(lo);
  for (let i = 0; i < 64; i++) {
    const mid = 0.5 * (lo + hi);
    if (Math.sign(f(mid)) === Math.sign(fLo)) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** The series coefficient C_n = 4 sin(zeta) / (2 zeta + sin(2 zeta)). */
export function slabCoefficient(zeta: number): number {
  return (4 * Math.sin(zeta)) / (2 * zeta + Math.sin(2 * zeta));
}

/** A wall's eigenvalues and coefficients, computed once for its Biot number. */
export interface SlabSeries {
  bi: number;
  zeta: Float64Array;
  coefficient: Float64Array;
}

/**
 * Enough terms for every Fourier number the sum is asked about: below Fo = 0.005 the heat has not reached 6
 * diffusion lengths in (see slabTemperatureRatio), and from there 60 terms leave exp(-zeta^2 Fo) below 1e-19.
 */
const TERMS = 60;

export function slabSeries(bi: number): SlabSeries {
  const zeta = new Float64Array(TERMS);
  const coefficient = new Float64Array(TERMS);
  for (let n = 1; n <= TERMS; n++) {
    zeta[n - 1] = slabEigenvalue(bi, n);
    coefficient[n - 1] = slabCoefficient(zeta[n - 1]);
  }
  return { bi, zeta, coefficient };
}

/** theta* from a precomputed series; see slabTemperatureRatio. */
export function slabSeriesRatio(series: SlabSeries, fo: number, xStar = 0): number {
  if (fo <= 0 || series.bi <= 0) return 1;
  // Far from the faces the wall has not felt them yet: the semi-infinite solid's erfc(6) is 2e-17.
  if ((1 - xStar) / (2 * Math.sqrt(fo)) > 6) return 1;
  let sum = 0;
  for (let n = 0; n < series.zeta.length; n++) {
    const decay = Math.exp(-series.zeta[n] * series.zeta[n] * fo);
    sum += series.coefficient[n] * decay * Math.cos(series.zeta[n] * xStar);
    if (decay < 1e-17) break;
  }
  return sum;
}

/** theta* of a plane wall at x* (0 = mid-plane, 1 = face) and Fourier number Fo; 1 at Fo = 0 inside the wall. */
export function slabTemperatureRatio(bi: number, fo: number, xStar = 0): number {
  return slabSeriesRatio(slabSeries(bi), fo, xStar);
}

/** The first-term approximation theta0* = C1 exp(-zeta1^2 Fo) at the mid-plane (valid for Fo > about 0.2). */
export function slabCenterFirstTerm(bi: number, fo: number): number {
  const zeta = slabEigenvalue(bi, 1);
  return slabCoefficient(zeta) * Math.exp(-zeta * zeta * fo);
}

/**
 * What the cake's cooling depends on. Lengths in mm; material in SI units.
 *
 * The cake loses heat through its four sides and its top; it stands on the build platform, taken as insulated
 * (no heat flows through it). A wall insulated on one face cools as half of a symmetric wall twice as thick, so the
 * cake is the product of walls of half-thickness x/2, y/2 and z, and its hottest point, the "core" here, is the
 * middle of its bottom face.
 */
export interface CakeThermal {
  /** The cake's size x, y, z (mm). */
  sizeMm: readonly number[];
  conductivityWPerMK: number;
  /** The powder's bulk density (g/cm^3). */
  densityGPerCm3: number;
  heatCapacityJPerKgK: number;
  surfaceWPerM2K: number;
  startTempC: number;
  ambientTempC: number;
  /** Divides every time: a calibration fitted from recorded core readings. Default 1. */
  coolingScale?: number;
}

/** The three walls' half-thicknesses (m): x/2 and y/2 between the side walls, z over the insulated platform. */
export function cakeHalfThicknessesM(sizeMm: readonly number[]): [number, number, number] {
  return [sizeMm[0] / 2 / 1000, sizeMm[1] / 2 / 1000, sizeMm[2] / 1000];
}

/** Thermal diffusivity alpha = k / (rho c), m^2/s. */
export function diffusivityM2PerS(c: Pick<CakeThermal, 'conductivityWPerMK' | 'densityGPerCm3' | 'heatCapacityJPerKgK'>): number {
  return c.conductivityWPerMK / (c.densityGPerCm3 * 1000 * c.heatCapacityJPerKgK);
}

/** The cake's core ratio (T_core - T_inf) / (T_i - T_inf) as a function of seconds, its series computed once. */
export function cakeCoreCurve(cake: CakeThermal): (seconds: number) => number {
  const alpha = diffusivityM2PerS(cake) * (cake.coolingScale ?? 1);
  const walls = cakeHalfThicknessesM(cake.sizeMm).map((L) => ({ L, series: slabSeries((cake.surfaceWPerM2K * L) / cake.conductivityWPerMK) }));
  return (seconds: number) => {
    let ratio = 1;
    for (const w of walls) ratio *= slabSeriesRatio(w.series, (alpha * Math.max(0, seconds)) / (w.L * w.L));
    return ratio;
  };
}

/** (T_core - T_inf) / (T_i - T_inf) of the cake after t seconds: the product of three plane walls at their mid-planes. */
export function cakeCoreRatio(cake: CakeThermal, seconds: number): number {
  return cakeCoreCurve(cake)(seconds);
}

/** The temperature at the cake's core (its hottest point) t seconds after cooling starts (degrees C). */
export function cakeCoreTempC(cake: CakeThermal, seconds: number): number {
  return cake.ambientTempC + (cake.startTempC - cake.ambientTempC) * cakeCoreRatio(cake, seconds);
}

/**
 * Seconds until the cake's core reaches targetC: 0 when it starts at or below it, Infinity when the target is at
 * or below the surroundings, which cooling only approaches. Bisection on the monotone core curve.
 */
export function cakeCoreSecondsTo(cake: CakeThermal, targetC: number): number {
  if (cake.startTempC <= targetC) return 0;
  if (targetC <= cake.ambientTempC) return Infinity;
  const wanted = (targetC - cake.ambientTempC) / (cake.startTempC - cake.ambientTempC);
  // Solved at factor 1 and divided by it, so calibrated times are exactly the model's over the factor.
  const curve = cakeCoreCurve({ ...cake, coolingScale: 1 });
  let hi = 3600;
  while (curve(hi) > wanted) {
    hi *= 2;
    if (hi > 1e12) return Infinity;
  }
  let lo = 0;
  for (let i = 0; i < 200 && hi - lo > 1e-9 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (curve(mid) > wanted) lo = mid;
    else hi = mid;
  }
  return hi / (cake.coolingScale ?? 1);
}

/**
 * The slowest mode's decay rate (1/hour): once the first terms dominate, the core's excess temperature falls by
 * e every 1 / rate hours. Useful where a single Newton-like constant is wanted.
 */
export function cakeDecayPerHour(cake: CakeThermal): number {
  const alpha = diffusivityM2PerS(cake) * (cake.coolingScale ?? 1);
  let rate = 0;
  for (const L of cakeHalfThicknessesM(cake.sizeMm)) {
    const zeta = slabEigenvalue((cake.surfaceWPerM2K * L) / cake.conductivityWPerMK, 1);
    rate += (zeta * zeta * alpha) / (L * L);
  }
  return rate * 3600;
}
