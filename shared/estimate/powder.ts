export interface PowderInput {
  cakeVolumeMm3: number;
  partsVolumeMm3: number;
  solidDensityGPerCm3: number;
  bulkDensityGPerCm3: number;
  /** Share of fresh powder in each fill, 0..1. */
  refreshRatio: number;
  /** Share of the loose powder lost at sieving. */
  sievingLossShare: number;
  /** Powder stuck to the parts as crust and blasted off, as a share of the parts' mass. */
  crustLossShare: number;
  /** Powder spread past the cake into the overflow and not recovered, as a share of the cake's mass. */
  feedSurplusShare: number;
}

export interface PowderEstimate {
  cakeVolumeCm3: number;
  /** The cake: the parts at the solid density plus the loose powder around them at the bulk density. */
  cakeMassKg: number;
  partsMassKg: number;
  looseMassKg: number;
  /** What is loaded for the build: the cake plus the feed surplus. Fresh plus reused. */
  fillKg: number;
  freshPowderKg: number;
  reusedPowderKg: number;
  /** Powder that leaves the loop: sieving, crust and feed surplus. */
  lossKg: number;
  sievingLossKg: number;
  crustLossKg: number;
  feedSurplusKg: number;
  /** The refresh ratio alone would not cover the parts and the losses; fresh powder was raised to cover them. */
  freshRaisedToCoverUse: boolean;
  /** Parts' volume / cake volume: the sintered share of the powder bed. */
  packingDensity: number;
}

const MM3_PER_CM3 = 1000;
const G_PER_KG = 1000;

/**
 * The powder's mass balance. The parts' volume holds solid material; the rest of the cake is loose powder:
 *   cake = parts (V_parts x rho_solid) + loose ((V_cake - V_parts) x rho_bulk).
 * The fill is the cake plus the feed surplus. After the build the parts and the losses leave the loop and the
 * rest of the fill returns to the used stock, so the used stock changes by fresh - parts - losses: fresh powder is
 * at least parts + losses (the used stock never grows from nothing) and at least the refresh ratio x the fill.
 */
export function powderEstimate(input: PowderInput): PowderEstimate {
  const cakeVolumeCm3 = input.cakeVolumeMm3 / MM3_PER_CM3;
  const partsVolumeCm3 = Math.min(input.partsVolumeMm3, input.cakeVolumeMm3) / MM3_PER_CM3;
  const partsMassKg = (partsVolumeCm3 * input.solidDensityGPerCm3) / G_PER_KG;
  const looseMassKg = ((cakeVolumeCm3 - partsVolumeCm3) * input.bulkDensityGPerCm3) / G_PER_KG;
  const cakeMassKg = partsMassKg + looseMassKg;
  const feedSurplusKg = cakeMassKg * input.feedSurplusShare;
  const fillKg = cakeMassKg + feedSurplusKg;
  const crustLossKg = Math.min(looseMassKg, partsMassKg * input.crustLossShare);
  const sievingLossKg = (looseMassKg - crustLossKg) * input.sievingLossShare;
  const lossKg = feedSurplusKg + crustLossKg + sievingLossKg;
  const byRatio = fillKg * input.refreshRatio;
  const byUse = partsMassKg + lossKg;
  const freshPowderKg = Math.min(fillKg, Math.max(byRatio, byUse));
  return {
    cakeVolumeCm3,
    cakeMassKg,
    partsMassKg,
    looseMassKg,
    fillKg,
    freshPowderKg,
    reusedPowderKg: fillKg - freshPowderKg,
    lossKg,
    sievingLossKg,
    crustLossKg,
    feedSurplusKg,
    freshRaisedToCoverUse: byUse > byRatio,
    packingDensity: input.cakeVolumeMm3 > 0 ? input.partsVolumeMm3 / input.cakeVolumeMm3 : 0,
  };
}
