import { estimateLayout, profileInfo, type CalibrationFactors, type AreaJump, type CostEstimate, type LayoutEstimate } from '../../shared/estimate';
import { hours } from './format';
import type { WorkingProfile } from './useWorkingProfile';
import type { PackInstanceInput, PackResult } from '../../shared/packing';
import { machineProfileSchema, materialProfileSchema, type MachineProfile, type MaterialProfile } from '../../shared/types/profiles';

/** The numbers the editor shows, from the server's estimate of a kept layout or the shared estimate of one not kept yet. */
export interface ShownNumbers {
  layers: number;
  heightMm: number;
  printSeconds: number;
  inMachineCoolingSeconds: number;
  outsideCoolingSeconds: number;
  cakeKg: number;
  freshKg: number;
  reusedKg: number;
  packingDensity: number;
  costPerPart: number | null;
  totalCost: number;
  /** The build's cost by what it pays for, and each part's share (by placement id: the request line), adding up to the total. */
  cost: Pick<CostEstimate, 'machineHours' | 'heldThroughOutsideCooling' | 'machineCost' | 'energyCost' | 'inertGasCost' | 'powderCost' | 'labourCost' | 'scrapCost' | 'perPart'> | null;
  placed: number;
  unplaced: number;
  areaPerLayerMm2: ArrayLike<number>;
  areaJumps: AreaJump[] | undefined;
  layerHeightMm: number;
  /** Where the per-layer areas (and so the scan time and the heat-load warnings) came from. */
  profileSource: 'mesh' | 'box';
  /** Placements counted by their box although the layout is estimated from the meshes, and which parts, why. */
  boxPlacements: number;
  boxParts: { name: string; reason: string }[];
  /** Read from the meshes: what counting every part as its box would have said (print, scanning, heat-load warnings). */
  byBoxes: { printSeconds: number; scanSeconds: number; areaJumps: number } | null;
}

function pick<T>(keys: string[], from: Record<string, unknown>): T {
  return Object.fromEntries(keys.filter((k) => from[k] !== undefined).map((k) => [k, from[k]])) as T;
}

const MACHINE_KEYS = Object.keys(machineProfileSchema.shape);
const MATERIAL_KEYS = Object.keys(materialProfileSchema.shape);

/** The plan's machine and material as the estimate takes them: the stored record's id and dates left out. */
export function profilesOf(machine: Record<string, unknown>, material: Record<string, unknown>): { machine: MachineProfile; material: MaterialProfile } {
  return { machine: pick<MachineProfile>(MACHINE_KEYS, machine), material: pick<MaterialProfile>(MATERIAL_KEYS, material) };
}

export function numbersFromEstimate(e: LayoutEstimate | Record<string, unknown>, result: Pick<PackResult, 'placements' | 'unplaced'> | { placedCount: number; unplacedCount: number }): ShownNumbers {
  const est = e as LayoutEstimate & { areaPerLayerMm2?: ArrayLike<number> };
  const placed = 'placements' in result ? result.placements.length : result.placedCount;
  const unplaced = 'placements' in result ? result.unplaced.reduce((s, u) => s + u.count, 0) : result.unplacedCount;
  return {
    layers: est.layerCount,
    heightMm: est.heightMm,
    printSeconds: est.print?.printSeconds,
    inMachineCoolingSeconds: est.cooling?.inMachineSeconds,
    outsideCoolingSeconds: est.cooling?.outsideSeconds,
    cakeKg: est.powder?.cakeMassKg,
    freshKg: est.powder?.freshPowderKg,
    reusedKg: est.powder?.reusedPowderKg,
    packingDensity: est.powder?.packingDensity,
    costPerPart: est.cost?.costPerPart ?? null,
    totalCost: est.cost?.totalCost,
    cost: est.cost && Array.isArray(est.cost.perPart) ? est.cost : null,
    placed,
    unplaced,
    areaPerLayerMm2: est.areaPerLayerMm2 ?? [],
    areaJumps: Array.isArray(est.areaJumps) ? est.areaJumps : undefined,
    layerHeightMm: est.layerHeightMm,
    ...profileOf(e as Record<string, unknown>),
    byBoxes: byBoxesOf((e as Record<string, unknown>).byBoxes),
  };
}

/** The box figures stored beside an estimate from the meshes, when they are there and read as numbers. */
function byBoxesOf(v: unknown): ShownNumbers['byBoxes'] {
  const b = v as Record<string, unknown> | null | undefined;
  const ok = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x) && x >= 0;
  return b && ok(b.printSeconds) && ok(b.scanSeconds) && ok(b.areaJumps) ? { printSeconds: b.printSeconds, scanSeconds: b.scanSeconds, areaJumps: b.areaJumps } : null;
}

/** One line comparing an estimate from the meshes with the same layout counted as boxes; null without the box figures. */
export function byBoxesText(n: Pick<ShownNumbers, 'printSeconds' | 'areaJumps' | 'byBoxes' | 'profileSource'>): string | null {
  const b = n.byBoxes;
  if (!b || n.profileSource !== 'mesh') return null;
  const jumps = n.areaJumps?.length ?? 0;
  const warnings = (k: number) => `${k} heat-load warning${k === 1 ? '' : 's'}`;
  // Box-like parts: the two readings agree to the figure shown.
  const time =
    hours(b.printSeconds) === hours(n.printSeconds)
      ? `also read ${hours(b.printSeconds)} to print`
      : `read ${hours(b.printSeconds)} to print (${hours(Math.max(0, b.printSeconds - n.printSeconds))} more)`;
  return `Counted as boxes, the same layout would ${time} and ${warnings(b.areaJumps)} (here ${jumps}).`;
}

/** The estimate's profile source as stored with it; estimates made before the meshes were sliced are box estimates. */
function profileOf(e: Record<string, unknown>): Pick<ShownNumbers, 'profileSource' | 'boxPlacements' | 'boxParts'> {
  const source = e.profileSource === 'mesh' ? 'mesh' : 'box';
  const boxPlacements = typeof e.profileBoxPlacements === 'number' ? e.profileBoxPlacements : 0;
  const boxParts = Array.isArray(e.profileBoxParts)
    ? (e.profileBoxParts as unknown[]).filter((p): p is { name: string; reason: string } => typeof (p as { name?: unknown })?.name === 'string' && typeof (p as { reason?: unknown })?.reason === 'string')
    : [];
  return { profileSource: source, boxPlacements, boxParts };
}

/** One line saying what the per-layer areas are made of, for every place that shows the estimate. */
export function profileSourceText(n: Pick<ShownNumbers, 'profileSource' | 'boxPlacements' | 'boxParts'>): string {
  if (n.profileSource === 'box') return 'Box estimate: every part counted as its bounding box (the parts\' shapes are not sliced for this layout), so scan time and heat load read high.';
  if (n.boxPlacements === 0) return "From the parts' shapes: each part's mesh sliced at the middle of every layer.";
  const which = n.boxParts.map((p) => `${p.name} (${p.reason})`).join('; ');
  return `From the parts' shapes, except ${n.boxPlacements} placed ${n.boxPlacements === 1 ? 'part' : 'parts'} counted as boxes${which ? `: ${which}` : ''}.`;
}

/** The same estimate the server makes, for a layout still on screen only; null when the profiles cannot be estimated. */
export function estimateWorking(
  instance: PackInstanceInput,
  result: PackResult,
  machine: Record<string, unknown>,
  material: Record<string, unknown>,
  volumeByLine: ReadonlyMap<string, number>,
  /** The layout's sections from the parts' meshes, when they have been sliced; the boxes otherwise. */
  profile: WorkingProfile | null = null,
  /** The machine's calibration from its recorded runs (none: the model's figures as they are). */
  calibration?: CalibrationFactors,
): ShownNumbers | null {
  try {
    const profiles = profilesOf(machine, material);
    let partsVolumeMm3 = 0;
    for (const p of result.placements) partsVolumeMm3 += volumeByLine.get(p.id) ?? p.size[0] * p.size[1] * p.size[2];
    const e = estimateLayout({
      layout: { placements: result.placements, heightMm: result.height, margin: { xy: instance.margin?.xy ?? 0, bottom: instance.margin?.bottom ?? 0, top: instance.margin?.top ?? 0 } },
      machine: profiles.machine,
      material: profiles.material,
      layerHeightMm: instance.layerHeight,
      partsVolumeMm3,
      // Each part's own volume, as the server takes it, so the cost per part is the same before and after keeping.
      volumeById: volumeByLine,
      partCount: result.placements.length,
      calibration,
      // As the server estimates a layout it keeps: the sliced areas when any placement was sliced.
      ...(profile && profile.meshPlacements > 0 ? { areaPerLayerMm2: profile.areaPerLayerMm2 } : {}),
    });
    return numbersFromEstimate({ ...e, ...profileInfo(profile) }, result);
  } catch {
    return null;
  }
}
