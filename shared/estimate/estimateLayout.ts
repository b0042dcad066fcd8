import {
  machineProfileSchema,
  machineSenseProblems,
  materialProfileSchema,
  materialSenseProblems,
  pairSenseProblems,
  type MachineProfile,
  type MaterialProfile,
} from '../types/profiles';
import {
  boxAreaProfile,
  boxArraysFromPlacements,
  boxCount,
  boxesTopMm,
  boxesVolumeMm3,
  findAreaJumps,
  type AreaJump,
  type AreaJumpOptions,
  type BoxArrays,
  type PlacedBox,
} from './areaProfile';
import { boxContourProfile } from './boxContour';
import { calibrationFactors, type CalibrationFactors, type CalibrationInput } from './calibration';
import { coolingEstimate, type CoolingEstimate } from './cooling';
import { costEstimate, type CostEstimate, type CostPart } from './cost';
import { layerCount, LENGTH_TOLERANCE_MM } from './layers';
import { powderEstimate, type PowderEstimate } from './powder';
import { printTimeEstimate, type PrintTimeEstimate } from './printTime';
import { InvalidInputError, isFiniteNumber, problemsFromZod, type Problem } from './problems';

export type { CalibrationFactors, CalibrationInput, PrintScaleFactors } from './calibration';
export { NO_CALIBRATION, calibrationFactors } from './calibration';

export interface LayoutMargins {
  xy: number;
  bottom: number;
  top: number;
}

/** A packed layout: boxes either as the packing result's placements (with their part ids) or as flat typed arrays (3 numbers a box). */
export interface EstimateLayout {
  placements?: readonly PlacedBox[];
  positionsMm?: ArrayLike<number>;
  sizesMm?: ArrayLike<number>;
  /** Top of the highest part from the chamber floor; taken from the boxes when left out. */
  heightMm?: number;
  /** The margins the layout was packed with; the material's when left out. */
  margin?: LayoutMargins;
}

export interface EstimateInput {
  layout: EstimateLayout;
  machine: MachineProfile;
  material: MaterialProfile;
  /** One of the machine's layer heights; the material's default when left out. */
  layerHeightMm?: number;
  calibration?: CalibrationInput;
  /** Cross-section area per layer from real meshes (from z = 0); the bounding boxes' profile when left out. */
  areaPerLayerMm2?: ArrayLike<number>;
  /** Contour length per layer from real meshes (mm); the boxes' perimeters when left out. */
  contourPerLayerMm?: ArrayLike<number>;
  /** The layer height the profiles were sliced at, when it differs from the one printed; they are resampled. */
  profileLayerHeightMm?: number;
  /** Parts' true (mesh) volume; the sum of the parts' volumes (or their boxes') when left out. */
  partsVolumeMm3?: number;
  /** A part's own (mesh) volume by its id, for the cost per part; its box's volume when missing. */
  volumeById?: ReadonlyMap<string, number> | Readonly<Record<string, number>>;
  /** The cake's base x, y (mm): the chamber the layout was packed for; the machine's chamber when left out. */
  cakeBaseMm?: readonly [number, number];
  /** The lab's recorded share of failed parts, 0 <= f < 1, for the scrap allowance. Default 0. */
  failureRate?: number;
  /** Part count for the cost per part; the number of boxes when left out. */
  partCount?: number;
  jumpOptions?: AreaJumpOptions;
}

export interface LayoutEstimate {
  layerHeightMm: number;
  layerCount: number;
  heightMm: number;
  partCount: number;
  /** The powder cake: the chamber's base times the spread height (layers x layer height). */
  cakeMm: [number, number, number];
  cakeVolumeMm3: number;
  partsVolumeMm3: number;
  partsVolumeSource: 'boxes' | 'given';
  /** Area per layer (mm^2), layer 0 on the floor, for the per-layer chart. */
  areaPerLayerMm2: Float32Array;
  areaSource: 'boxes' | 'given';
  /** Where hatch areas and contours came from: real slices ("mesh") or the parts' boxes ("box"). */
  profileSource: 'mesh' | 'box';
  areaJumps: AreaJump[];
  print: PrintTimeEstimate;
  cooling: CoolingEstimate;
  /** Preheat, print and in-machine cooling: the time the machine is taken. */
  machineSeconds: number;
  powder: PowderEstimate;
  cost: CostEstimate;
  /**
   * The same layout with every part counted as its bounding box, when the areas came from the meshes: the print
   * time, its scanning (hatch and contour) and the heat-load warnings a box estimate would give, for comparison.
   */
  byBoxes?: { printSeconds: number; scanSeconds: number; areaJumps: number };
  /**
   * The factors the estimate was made with, and their overall effect on the print time (scaled / unscaled print
   * seconds) for readers that rescale a stored estimate by one print factor.
   */
  calibration: CalibrationFactors & { printTimeScale: number };
}

/**
 * Below this share of the bed's area, a change of scanned area between layers is too small to matter for the
 * heat balance (common practice, chosen so that small features coming and going do not flag).
 */
export const AREA_JUMP_MIN_SHARE_OF_BED = 0.02;

function validate(input: EstimateInput): { problems: Problem[]; boxes: BoxArrays | null } {
  const problems: Problem[] = [];
  const machine = machineProfileSchema.safeParse(input.machine);
  if (!machine.success) problems.push(...problemsFromZod('machine', machine.error));
  const material = materialProfileSchema.safeParse(input.material);
  if (!material.success) problems.push(...problemsFromZod('material', material.error));
  if (machine.success) problems.push(...machineSenseProblems(machine.data).map((p) => ({ field: `machine.${p.field}`, message: p.message })));
  if (material.success) problems.push(...materialSenseProblems(material.data).map((p) => ({ field: `material.${p.field}`, message: p.message })));
  if (machine.success && material.success) problems.push(...pairSenseProblems(machine.data, material.data));
  // Checked against the machine's list even when other machine fields are wrong, so every problem shows at once.
  const machineHeights = Array.isArray(input.machine?.layerHeightsMm) && input.machine.layerHeightsMm.every(isFiniteNumber)
    ? input.machine.layerHeightsMm
    : null;
  const onMachine = (h: number) => machineHeights === null || machineHeights.some((x) => Math.abs(x - h) <= LENGTH_TOLERANCE_MM);
  if (input.layerHeightMm !== undefined) {
    if (!isFiniteNumber(input.layerHeightMm) || input.layerHeightMm <= 0) {
      problems.push({ field: 'layerHeightMm', message: 'must be a positive number' });
    } else if (!onMachine(input.layerHeightMm)) {
      problems.push({
        field: 'layerHeightMm',
        message: `${input.layerHeightMm} is not one of the machine's layer heights (${machineHeights!.join(', ')})`,
      });
    }
  } else if (material.success && !onMachine(material.data.defaultLayerHeightMm)) {
    problems.push({
      field: 'layerHeightMm',
      message: `the material's default ${material.data.defaultLayerHeightMm} is not one of the machine's layer heights; choose one`,
    });
  }

  const layout = input.layout;
  let boxes: BoxArrays | null = null;
  if (layout === null || typeof layout !== 'object') {
    problems.push({ field: 'layout', message: 'is required' });
  } else if (layout.placements !== undefined) {
    if (!Array.isArray(layout.placements)) {
      problems.push({ field: 'layout.placements', message: 'must be an array' });
    } else {
      const before = problems.length;
      layout.placements.forEach((p, i) => {
        for (const key of ['position', 'size'] as const) {
          const v = p?.[key];
          if (v === null || typeof v !== 'object' || v.length !== 3) {
            problems.push({ field: `layout.placements[${i}].${key}`, message: 'must be three numbers' });
            continue;
          }
          Array.from(v).forEach((x, a) => {
            if (!isFiniteNumber(x) || (key === 'size' ? x <= 0 : false)) {
              problems.push({ field: `layout.placements[${i}].${key}[${a}]`, message: key === 'size' ? 'must be a positive number' : 'must be a finite number' });
            }
          });
        }
      });
      if (problems.length === before) boxes = boxArraysFromPlacements(layout.placements);
    }
  } else if (layout.positionsMm !== undefined && layout.sizesMm !== undefined) {
    const { positionsMm, sizesMm } = layout;
    const before = problems.length;
    if (positionsMm.length % 3 !== 0) problems.push({ field: 'layout.positionsMm', message: 'length must be a multiple of 3' });
    if (sizesMm.length !== positionsMm.length) problems.push({ field: 'layout.sizesMm', message: 'must have the same length as layout.positionsMm' });
    for (let i = 0; i < positionsMm.length; i++) {
      if (!isFiniteNumber(positionsMm[i])) problems.push({ field: `layout.positionsMm[${i}]`, message: 'must be a finite number' });
    }
    for (let i = 0; i < sizesMm.length; i++) {
      if (!isFiniteNumber(sizesMm[i]) || sizesMm[i] <= 0) problems.push({ field: `layout.sizesMm[${i}]`, message: 'must be a positive number' });
    }
    if (problems.length === before) boxes = { positionsMm, sizesMm };
  } else {
    problems.push({ field: 'layout', message: 'needs placements, or positionsMm and sizesMm' });
  }

  if (layout && typeof layout === 'object') {
    if (layout.heightMm !== undefined && (!isFiniteNumber(layout.heightMm) || layout.heightMm < 0)) {
      problems.push({ field: 'layout.heightMm', message: 'must be a non-negative number' });
    } else if (layout.heightMm !== undefined && boxes && boxesTopMm(boxes) > layout.heightMm + LENGTH_TOLERANCE_MM) {
      problems.push({ field: 'layout.heightMm', message: `is below the top of the highest box (${boxesTopMm(boxes)})` });
    }
    if (layout.margin !== undefined) {
      for (const key of ['xy', 'bottom', 'top'] as const) {
        const v = layout.margin?.[key];
        if (!isFiniteNumber(v) || v < 0) problems.push({ field: `layout.margin.${key}`, message: 'must be a non-negative number' });
      }
    }
  }
  if (input.partsVolumeMm3 !== undefined && (!isFiniteNumber(input.partsVolumeMm3) || input.partsVolumeMm3 < 0)) {
    problems.push({ field: 'partsVolumeMm3', message: 'must be a non-negative number' });
  }
  if (input.partCount !== undefined && (!Number.isInteger(input.partCount) || input.partCount < 0)) {
    problems.push({ field: 'partCount', message: 'must be a non-negative integer' });
  }
  if (input.calibration !== undefined) {
    const c = input.calibration as unknown as Record<string, unknown> | null;
    const keys = c && 'layerTimeScale' in c ? ['layerTimeScale', 'scanTimeScale', 'coolingScale'] : ['printTimeScale', 'coolingScale'];
    for (const key of keys) {
      const v = c?.[key];
      if (!isFiniteNumber(v) || v <= 0) problems.push({ field: `calibration.${key}`, message: 'must be a positive number' });
    }
    const runs = input.calibration?.runs;
    if (!Number.isInteger(runs) || runs < 0) problems.push({ field: 'calibration.runs', message: 'must be a non-negative integer' });
    if (typeof input.calibration?.calibrated !== 'boolean') problems.push({ field: 'calibration.calibrated', message: 'must be true or false' });
  }
  for (const key of ['areaPerLayerMm2', 'contourPerLayerMm'] as const) {
    const profile = input[key];
    if (profile === undefined) continue;
    if (profile === null || typeof profile !== 'object' || typeof profile.length !== 'number') {
      problems.push({ field: key, message: 'must be an array of numbers' });
      continue;
    }
    for (let l = 0; l < profile.length; l++) {
      if (!isFiniteNumber(profile[l]) || profile[l] < 0) {
        problems.push({ field: `${key}[${l}]`, message: 'must be a non-negative number' });
        break;
      }
    }
  }
  if (input.profileLayerHeightMm !== undefined && (!isFiniteNumber(input.profileLayerHeightMm) || input.profileLayerHeightMm <= 0)) {
    problems.push({ field: 'profileLayerHeightMm', message: 'must be a positive number' });
  }
  if (input.failureRate !== undefined && (!isFiniteNumber(input.failureRate) || input.failureRate < 0 || input.failureRate >= 1)) {
    problems.push({ field: 'failureRate', message: 'must be a share from 0 up to (not including) 1' });
  }
  if (input.cakeBaseMm !== undefined) {
    const b = input.cakeBaseMm;
    if (!Array.isArray(b) || b.length !== 2 || !b.every((x) => isFiniteNumber(x) && x > 0)) {
      problems.push({ field: 'cakeBaseMm', message: 'must be two positive numbers' });
    }
  }
  return { problems, boxes };
}

/**
 * A per-layer profile sliced at one layer height, resampled to another so that the integral (sum x layer height)
 * is kept: the cumulative integral is interpolated linearly and differenced at the new layer boundaries.
 */
export function resampleProfile(profile: ArrayLike<number>, fromLayerMm: number, toLayerMm: number, layers: number): Float32Array {
  const out = new Float32Array(layers);
  const n = profile.length;
  const cumulative = new Float64Array(n + 1);
  for (let l = 0; l < n; l++) cumulative[l + 1] = cumulative[l] + profile[l] * fromLayerMm;
  const at = (z: number) => {
    const x = z / fromLayerMm;
    if (x <= 0) return 0;
    if (x >= n) return cumulative[n];
    const i = Math.floor(x);
    return cumulative[i] + (cumulative[i + 1] - cumulative[i]) * (x - i);
  };
  for (let j = 0; j < layers; j++) out[j] = Math.max(0, (at((j + 1) * toLayerMm) - at(j * toLayerMm)) / toLayerMm);
  return out;
}

function fitProfile(field: string, profile: ArrayLike<number>, sourceLayerMm: number, layerHeightMm: number, layers: number): Float32Array {
  if (Math.abs(sourceLayerMm - layerHeightMm) > LENGTH_TOLERANCE_MM) return resampleProfile(profile, sourceLayerMm, layerHeightMm, layers);
  if (profile.length > layers) {
    throw new InvalidInputError([{ field, message: `has ${profile.length} layers, the layout has ${layers}` }]);
  }
  // A sliced profile stops at the top of the highest part; the powder over it is layers with nothing to scan.
  const out = new Float32Array(layers);
  for (let l = 0; l < profile.length; l++) out[l] = profile[l];
  return out;
}

function volumeOf(volumeById: EstimateInput['volumeById'], id: unknown): number | undefined {
  if (volumeById === undefined || typeof id !== 'string') return undefined;
  const v = volumeById instanceof Map ? volumeById.get(id) : (volumeById as Record<string, number>)[id];
  return isFiniteNumber(v) && v >= 0 ? v : undefined;
}

/**
 * Everything a layout means on a machine and a material: layers, print time, cooling, powder, packing density
 * and cost, the same in the plan editor, on the server and from the command line (docs/estimate.md). Validates
 * the whole input first and throws InvalidInputError listing every problem with its field.
 */
export function estimateLayout(input: EstimateInput): LayoutEstimate {
  const { problems, boxes: validBoxes } = validate(input);
  if (problems.length > 0 || validBoxes === null) throw new InvalidInputError(problems);
  const boxes = validBoxes;
  const { machine, material } = input;
  const layerHeightMm = input.layerHeightMm ?? material.defaultLayerHeightMm;
  const margin = input.layout.margin ?? { xy: material.marginXyMm, bottom: material.marginBottomMm, top: material.marginTopMm };
  const heightMm = input.layout.heightMm ?? boxesTopMm(boxes);
  const layers = layerCount(heightMm, margin.top, layerHeightMm);
  const sourceLayerMm = input.profileLayerHeightMm ?? layerHeightMm;

  const meshArea = input.areaPerLayerMm2 !== undefined;
  const areaPerLayerMm2 = meshArea
    ? fitProfile('areaPerLayerMm2', input.areaPerLayerMm2!, sourceLayerMm, layerHeightMm, layers)
    : boxAreaProfile(boxes, layerHeightMm, layers);
  const contourPerLayerMm =
    input.contourPerLayerMm !== undefined
      ? fitProfile('contourPerLayerMm', input.contourPerLayerMm, sourceLayerMm, layerHeightMm, layers)
      : boxContourProfile(boxes, layerHeightMm, layers);

  const factors = calibrationFactors(input.calibration);
  const print = printTimeEstimate(areaPerLayerMm2, contourPerLayerMm, layerHeightMm, machine, material, factors);

  // The powder fills the whole chamber floor, margins included: they are unsintered powder, not empty space.
  const base = input.cakeBaseMm ?? [machine.chamberMm[0], machine.chamberMm[1]];
  const cakeMm: [number, number, number] = [base[0], base[1], layers * layerHeightMm];
  const cakeVolumeMm3 = cakeMm[0] * cakeMm[1] * cakeMm[2];
  const cooling = coolingEstimate({
    sizeMm: cakeMm,
    conductivityWPerMK: material.powderConductivityWPerMK,
    densityGPerCm3: material.bulkDensityGPerCm3,
    heatCapacityJPerKgK: material.powderHeatCapacityJPerKgK,
    surfaceWPerM2K: machine.coolingSurfaceWPerM2K,
    startTempC: material.bedTempC,
    ambientTempC: machine.ambientTempC,
    removalTempC: machine.removalTempC,
    handlingTempC: machine.handlingTempC,
    coolingScale: factors.coolingScale,
  });

  // The parts one by one, for the cost allocation: their own volume where known, their box's otherwise.
  const costParts: CostPart[] = [];
  const placements = input.layout.placements;
  for (let i = 0, n = boxCount(boxes); i < n; i++) {
    const sx = boxes.sizesMm[3 * i];
    const sy = boxes.sizesMm[3 * i + 1];
    const sz = boxes.sizesMm[3 * i + 2];
    const rawId = placements?.[i] ? (placements[i] as { id?: unknown }).id : undefined;
    const id = typeof rawId === 'string' ? rawId : `#${i + 1}`;
    costParts.push({ id, volumeMm3: volumeOf(input.volumeById, rawId) ?? sx * sy * sz, heightMm: sz });
  }
  const partsVolumeMm3 = input.partsVolumeMm3 ?? (input.volumeById !== undefined ? costParts.reduce((s, p) => s + p.volumeMm3, 0) : boxesVolumeMm3(boxes));
  const powder = powderEstimate({
    cakeVolumeMm3,
    partsVolumeMm3,
    solidDensityGPerCm3: material.solidDensityGPerCm3,
    bulkDensityGPerCm3: material.bulkDensityGPerCm3,
    refreshRatio: material.refreshRatio,
    sievingLossShare: material.sievingLossShare,
    crustLossShare: material.crustLossShare,
    feedSurplusShare: material.feedSurplusShare,
  });

  const partCount = input.partCount ?? boxCount(boxes);
  const machineSeconds = print.printSeconds + cooling.inMachineSeconds;
  const cost = costEstimate({
    parts: costParts,
    preheatSeconds: print.preheatSeconds,
    scanSeconds: print.scanSeconds + print.contourSeconds,
    layerFixedSeconds: print.recoatSeconds + print.otherSeconds,
    inMachineCoolingSeconds: cooling.inMachineSeconds,
    outsideCoolingSeconds: cooling.outsideSeconds,
    machine,
    pricePerKg: material.pricePerKg,
    freshPowderKg: powder.freshPowderKg,
    partsPowderKg: powder.partsMassKg + powder.crustLossKg,
    failureRate: input.failureRate ?? 0,
  });

  const bedAreaMm2 = cakeMm[0] * cakeMm[1];
  const jumpOptions = { minDeltaMm2: AREA_JUMP_MIN_SHARE_OF_BED * bedAreaMm2, ...input.jumpOptions };
  const areaJumps = findAreaJumps(areaPerLayerMm2, jumpOptions);

  // Read from the meshes, the boxes' figures go alongside: what counting every part as its box would have said.
  let byBoxes: LayoutEstimate['byBoxes'];
  if (meshArea) {
    const boxArea = boxAreaProfile(boxes, layerHeightMm, layers);
    const boxPrint = printTimeEstimate(boxArea, boxContourProfile(boxes, layerHeightMm, layers), layerHeightMm, machine, material, factors);
    byBoxes = {
      printSeconds: boxPrint.printSeconds,
      scanSeconds: boxPrint.scanSeconds + boxPrint.contourSeconds,
      areaJumps: findAreaJumps(boxArea, jumpOptions).length,
    };
  }

  return {
    layerHeightMm,
    layerCount: layers,
    heightMm,
    partCount,
    cakeMm,
    cakeVolumeMm3,
    partsVolumeMm3,
    partsVolumeSource: input.partsVolumeMm3 !== undefined || input.volumeById !== undefined ? 'given' : 'boxes',
    areaPerLayerMm2,
    areaSource: meshArea ? 'given' : 'boxes',
    profileSource: meshArea ? 'mesh' : 'box',
    areaJumps,
    print,
    cooling,
    machineSeconds,
    powder,
    cost,
    ...(byBoxes ? { byBoxes } : {}),
    calibration: { ...factors, printTimeScale: print.printSeconds > 0 ? print.printSeconds / unscaledPrintSeconds(areaPerLayerMm2, contourPerLayerMm, layerHeightMm, machine, material) : 1 },
  };
}

function unscaledPrintSeconds(
  area: ArrayLike<number>,
  contour: ArrayLike<number>,
  layerHeightMm: number,
  machine: MachineProfile,
  material: MaterialProfile,
): number {
  return printTimeEstimate(area, contour, layerHeightMm, machine, material).printSeconds;
}
