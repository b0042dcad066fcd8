export interface PowderInput {
  cakeVolumeMm3: number;
  partsVolumeMm3: number;
  solidDensityGPerCm3: number;
  bulkDensityGPerCm3: number;
  /** Share of fresh powder in each fill, 0..1. */
  refreshRatio: number;
}

export interface PowderEstimate {
  cakeVolumeCm3: number;
  /** Powder spread for the whole cake, at the packed (bulk) density. */
  cakeMassKg: number;
  freshPowderKg: number;
  reusedPowderKg: number;
  /** Sintered parts at the solid density. */
  partsMassKg: number;
  /** Parts' volume / cake volume: the sintered share of the powder bed. */
  packingDensity: number;
}

const MM3_PER_CM3 = 1000;
const G_PER_KG = 1000;

export function powderEstimate(input: PowderInput): PowderEstimate {
  const cakeVolumeCm3 = input.cakeVolumeMm3 / MM3_PER_CM3;
  const cakeMassKg = (cakeVolumeCm3 * input.bulkDensityGPerCm3) / G_PER_KG;
  const partsMassKg = ((input.partsVolumeMm3 / MM3_PER_CM3) * input.solidDensityGPerCm3) / G_PER_KG;
  return {
    cakeVolumeCm3,
    cakeMassKg,
    freshPowderKg: cakeMassKg * input.refreshRatio,
    reusedPowderKg: cakeMassKg * (1 - input.refreshRatio),
    partsMassKg,
    packingDensity: input.cakeVolumeMm3 > 0 ? input.partsVolumeMm3 / input.cakeVolumeMm3 : 0,
  };
}
