export interface CostInput {
  /** Hours the machine is taken: preheat, print and cooling in the machine. */
  machineSeconds: number;
  hourlyRate: number;
  freshPowderKg: number;
  pricePerKg: number;
  labourHoursPerBuild: number;
  labourRate: number;
  partCount: number;
}

export interface CostEstimate {
  machineHours: number;
  machineCost: number;
  powderCost: number;
  labourCost: number;
  totalCost: number;
  /** null for a build without parts. */
  costPerPart: number | null;
}

/**
 * Powder is charged as the fresh powder loaded into the fill. Reused powder is not charged again: it was
 * paid for when it first came in fresh, and at a steady refresh ratio the fresh share of each fill is what
 * the lab buys per build (it covers the sintered parts plus the powder aged out of the loop).
 */
export function costEstimate(input: CostInput): CostEstimate {
  const machineHours = input.machineSeconds / 3600;
  const machineCost = machineHours * input.hourlyRate;
  const powderCost = input.freshPowderKg * input.pricePerKg;
  const labourCost = input.labourHoursPerBuild * input.labourRate;
  const totalCost = machineCost + powderCost + labourCost;
  return {
    machineHours,
    machineCost,
    powderCost,
    labourCost,
    totalCost,
    costPerPart: input.partCount > 0 ? totalCost / input.partCount : null,
  };
}
