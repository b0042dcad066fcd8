import {
  machineProfileSchema,
  materialProfileSchema,
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
import { coolingEstimate, type CoolingEstimate } from './cooling';
import { costEstimate, type CostEstimate } from './cost';
import { layerCount, LENGTH_TOLERANCE_MM } from './layers';
import { powderEstimate, type PowderEstimate } from './powder';
import { printTimeEstimate, type PrintTimeEstimate } from './printTime';
import { InvalidInputError, isFiniteNumber, problemsFromZod, type Problem } from './problems';

/** Estimate factors fitted from a machine's recorded runs; 1 and 1 when not calibrated. */
export interface CalibrationFactors {
  printTimeScale: number;
  coolingScale: number;
  /** Recorded runs the factors were fitted from. */
  runs: number;
  /** False when there were too few runs and the factors are left at 1. */
  calibrated: boolean;
}

export interface LayoutMargins {
  xy: number;
  bottom: number;
  top: number;
}

/** A packed layout: boxes either as the packing result's placements or as flat typed arrays (3 numbers a box). */
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
  calibration?: CalibrationFactors;
  /** Cross-section area per layer from real meshes; the bounding boxes' profile when left out. */
  areaPerLayerMm2?: ArrayLike<number>;
  /** Parts' true (mesh) volume; the boxes' volume when left out, which overstates it. */
  partsVolumeMm3?: number;
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
  areaJumps: AreaJump[];
  print: PrintTimeEstimate;
  cooling: CoolingEstimate;
  /** Preheat, print and in-machine cooling: the time the machine is taken. */
  machineSeconds: number;
  powder: PowderEstimate;
  cost: CostEstimate;
  /** The factors the estimate was made with. */
  calibration: CalibrationFactors;
}

/**
 * Below this share of the bed's area, a change of scanned area between layers is too small to matter for the
 * heat balance (common practice, chosen so that small features coming and going do not flag).
 */
export const AREA_JUMP_MIN_SHARE_OF_BED = 0.02;

export const NO_CALIBRATION: CalibrationFactors = { printTimeScale: 1, coolingScale: 1, runs: 0, calibrated: false };

function validate(input: EstimateInput): { problems: Problem[]; boxes: BoxArrays | null } {
  const problems: Problem[] = [];
  const machine = machineProfileSchema.safeParse(input.machine);
  if (!machine.success) problems.push(...problemsFromZod('machine', machine.error));
  const material = materialProfileSchema.safeParse(input.material);
  if (!material.success) problems.push(...problemsFromZod('material', material.error));
  if (machine.success) {
    const m = machine.data;
    if (!(m.handlingTempC > m.ambientTempC)) {
      problems.push({ field: 'machine.handlingTempC', message: 'must be above the ambient temperature, which cooling only approaches' });
    }
    if (!(m.removalTempC >= m.handlingTempC)) {
      problems.push({ field: 'machine.removalTempC', message: 'must be at or above the handling temperature' });
    }
  }
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
    for (const key of ['printTimeScale', 'coolingScale'] as const) {
      const v = input.calibration?.[key];
      if (!isFiniteNumber(v) || v <= 0) problems.push({ field: `calibration.${key}`, message: 'must be a positive number' });
    }
    const runs = input.calibration?.runs;
    if (!Number.isInteger(runs) || runs < 0) problems.push({ field: 'calibration.runs', message: 'must be a non-negative integer' });
    if (typeof input.calibration?.calibrated !== 'boolean') problems.push({ field: 'calibration.calibrated', message: 'must be true or false' });
  }
  if (input.areaPerLayerMm2 !== undefined) {
    const profile = input.areaPerLayerMm2;
    for (let l = 0; l < profile.length; l++) {
      if (!isFiniteNumber(profile[l]) || profile[l] < 0) {
        problems.push({ field: `areaPerLayerMm2[${l}]`, message: 'must be a non-negative number' });
        break;
      }
    }
  }
  return { problems, boxes };
}

/**
 * Everything a layout means on a machine and a material: layers, print time, cooling, powder, packing density
 * and cost. Validates the whole input first and throws InvalidInputError listing every problem with its field.
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

  let areaPerLayerMm2: Float32Array;
  let areaSource: 'boxes' | 'given';
  if (input.areaPerLayerMm2 !== undefined) {
    if (input.areaPerLayerMm2.length !== layers) {
      throw new InvalidInputError([
        { field: 'areaPerLayerMm2', message: `has ${input.areaPerLayerMm2.length} layers, the layout has ${layers}` },
      ]);
    }
    areaPerLayerMm2 = Float32Array.from(input.areaPerLayerMm2);
    areaSource = 'given';
  } else {
    areaPerLayerMm2 = boxAreaProfile(boxes, layerHeightMm, layers);
    areaSource = 'boxes';
  }

  const factors = input.calibration ?? NO_CALIBRATION;
  const print = printTimeEstimate(areaPerLayerMm2, machine, material, factors.printTimeScale);

  // The powder fills the whole chamber floor, margins included: they are unsintered powder, not empty space.
  const cakeMm: [number, number, number] = [machine.chamberMm[0], machine.chamberMm[1], layers * layerHeightMm];
  const cakeVolumeMm3 = cakeMm[0] * cakeMm[1] * cakeMm[2];
  const cooling = coolingEstimate({
    startTempC: material.bedTempC,
    ambientTempC: machine.ambientTempC,
    removalTempC: machine.removalTempC,
    handlingTempC: machine.handlingTempC,
    inMachinePerHour: machine.coolingInMachinePerHour,
    outsidePerHour: machine.coolingOutsidePerHour,
    cakeMm,
    referenceCakeMm: machine.chamberMm,
    coolingScale: factors.coolingScale,
  });

  const partsVolumeMm3 = input.partsVolumeMm3 ?? boxesVolumeMm3(boxes);
  const powder = powderEstimate({
    cakeVolumeMm3,
    partsVolumeMm3,
    solidDensityGPerCm3: material.solidDensityGPerCm3,
    bulkDensityGPerCm3: material.bulkDensityGPerCm3,
    refreshRatio: material.refreshRatio,
  });

  const partCount = input.partCount ?? boxCount(boxes);
  const machineSeconds = print.printSeconds + cooling.inMachineSeconds;
  const cost = costEstimate({
    machineSeconds,
    hourlyRate: machine.hourlyRate,
    freshPowderKg: powder.freshPowderKg,
    pricePerKg: material.pricePerKg,
    labourHoursPerBuild: machine.labourHoursPerBuild,
    labourRate: machine.labourRate,
    partCount,
  });

  const bedAreaMm2 = machine.chamberMm[0] * machine.chamberMm[1];
  const areaJumps = findAreaJumps(areaPerLayerMm2, {
    minDeltaMm2: AREA_JUMP_MIN_SHARE_OF_BED * bedAreaMm2,
    ...input.jumpOptions,
  });

  return {
    layerHeightMm,
    layerCount: layers,
    heightMm,
    partCount,
    cakeMm,
    cakeVolumeMm3,
    partsVolumeMm3,
    partsVolumeSource: input.partsVolumeMm3 !== undefined ? 'given' : 'boxes',
    areaPerLayerMm2,
    areaSource,
    areaJumps,
    print,
    cooling,
    machineSeconds,
    powder,
    cost,
    calibration: {
      printTimeScale: factors.printTimeScale,
      coolingScale: factors.coolingScale,
      runs: factors.runs,
      calibrated: factors.calibrated,
    },
  };
}
