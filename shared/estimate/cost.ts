/** One placed copy of a part, as the cost allocation sees it. */
export interface CostPart {
  id: string;
  /** The part's own (mesh) volume, or its box's when the mesh's is unknown (mm^3). */
  volumeMm3: number;
  /** Its extent along z as placed: the layers it spans (mm). */
  heightMm: number;
}

export interface CostInput {
  parts: readonly CostPart[];
  /** Times after calibration (s). */
  preheatSeconds: number;
  /** Hatch and contour time. */
  scanSeconds: number;
  /** Recoat and minimum-layer waits. */
  layerFixedSeconds: number;
  inMachineCoolingSeconds: number;
  outsideCoolingSeconds: number;
  machine: {
    hourlyRate: number;
    chamberCount: number;
    labourHoursPerBuild: number;
    labourRate: number;
    electricalPowerKw: number;
    energyPricePerKWh: number;
    inertGasM3PerHour: number;
    inertGasPricePerM3: number;
  };
  pricePerKg: number;
  freshPowderKg: number;
  /** Fresh powder that ends in the parts and their crust; the rest of the fresh powder is the build's share of the loop. */
  partsPowderKg: number;
  /** The lab's recorded share of failed parts, 0 <= f < 1. */
  failureRate: number;
}

export interface PartCost {
  id: string;
  count: number;
  /** Cost of one copy (the mean over its copies when they stand at different heights). */
  each: number;
  /** All copies. */
  total: number;
}

export interface CostEstimate {
  /** Hours the machine is held: preheat, print, cooling in the machine, and cooling outside when it has one chamber. */
  machineHours: number;
  /** The single chamber is held through the outside cooling too. */
  heldThroughOutsideCooling: boolean;
  machineCost: number;
  energyCost: number;
  inertGasCost: number;
  powderCost: number;
  labourCost: number;
  /** Allowance for failed parts: (costs above) x f / (1 - f). */
  scrapCost: number;
  totalCost: number;
  /** Mean over the parts; null for a build without parts. */
  costPerPart: number | null;
  perPart: PartCost[];
}

/**
 * A build's cost and its allocation to parts, after the cost models of laser sintering that charge machine time,
 * material and labour per build and share them over the parts (Hopkinson & Dickens, Proc. IMechE Part C 217, 2003;
 * Ruffo, Tuck & Hague, Proc. IMechE Part B 220, 2006). Shares, documented in docs/estimate.md:
 *
 * - by volume: the machine, energy time of hatching and contours (the laser draws each part's volume), the fresh
 *   powder that ends in the parts and their crust;
 * - by height: everything else the machine is held for (preheat, recoat, layer waits, cooling), inert gas, the
 *   energy of those hours and the rest of the fresh powder (a taller part makes the cake taller);
 * - equally: labour (each part is dug out, cleaned and checked by hand: common practice);
 * - the scrap allowance in proportion to each part's cost.
 *
 * Every share grows with volume or height and none shrinks, so a part with more volume and more height never
 * costs less; the shares sum to 1, so the parts' costs add up to the build's total.
 */
export function costEstimate(input: CostInput): CostEstimate {
  const m = input.machine;
  const heldThroughOutsideCooling = m.chamberCount <= 1;
  const fixedSeconds = input.preheatSeconds + input.layerFixedSeconds;
  const heldSeconds = fixedSeconds + input.scanSeconds + input.inMachineCoolingSeconds + (heldThroughOutsideCooling ? input.outsideCoolingSeconds : 0);
  const rate = m.hourlyRate / 3600;
  const kwhPrice = (m.electricalPowerKw * m.energyPricePerKWh) / 3600;
  const gasPrice = (m.inertGasM3PerHour * m.inertGasPricePerM3) / 3600;

  const scanMachine = input.scanSeconds * rate;
  const scanEnergy = input.scanSeconds * kwhPrice;
  const otherMachine = (heldSeconds - input.scanSeconds) * rate;
  const otherEnergy = fixedSeconds * kwhPrice;
  const gas = (input.preheatSeconds + input.layerFixedSeconds + input.scanSeconds + input.inMachineCoolingSeconds) * gasPrice;
  const partsPowder = Math.min(input.freshPowderKg, input.partsPowderKg) * input.pricePerKg;
  const restPowder = input.freshPowderKg * input.pricePerKg - partsPowder;
  const labour = m.labourHoursPerBuild * m.labourRate;

  const byVolume = scanMachine + scanEnergy + partsPowder;
  const byHeight = otherMachine + otherEnergy + gas + restPowder;
  const subtotal = byVolume + byHeight + labour;
  const f = input.failureRate;
  const scrapFactor = f > 0 ? f / (1 - f) : 0;
  const scrap = subtotal * scrapFactor;

  const n = input.parts.length;
  const sumVolume = input.parts.reduce((s, p) => s + p.volumeMm3, 0);
  const sumHeight = input.parts.reduce((s, p) => s + p.heightMm, 0);
  const byId = new Map<string, { count: number; total: number }>();
  for (const p of input.parts) {
    const v = sumVolume > 0 ? p.volumeMm3 / sumVolume : 1 / n;
    const h = sumHeight > 0 ? p.heightMm / sumHeight : 1 / n;
    const cost = (byVolume * v + byHeight * h + labour / n) * (1 + scrapFactor);
    const entry = byId.get(p.id) ?? { count: 0, total: 0 };
    entry.count += 1;
    entry.total += cost;
    byId.set(p.id, entry);
  }
  const perPart = [...byId].map(([id, e]) => ({ id, count: e.count, each: e.total / e.count, total: e.total }));
  const totalCost = n > 0 ? perPart.reduce((s, p) => s + p.total, 0) : subtotal + scrap;
  return {
    machineHours: heldSeconds / 3600,
    heldThroughOutsideCooling,
    machineCost: scanMachine + otherMachine,
    energyCost: scanEnergy + otherEnergy,
    inertGasCost: gas,
    powderCost: partsPowder + restPowder,
    labourCost: labour,
    scrapCost: scrap,
    totalCost,
    costPerPart: n > 0 ? totalCost / n : null,
    perPart,
  };
}
