/**
 * Estimates one packed build: `npm run --silent estimate -- JOB.json` (or `-`
 * for standard input). Prints an `estimate/1` result as JSON and exits 0;
 * bad input exits 2 with one line on standard error naming the field.
 *
 * The same `estimateLayout` the plan editor, the server and the build sheet
 * use does the work; this file only reads the job and names its fields. The
 * machine and material fields it reads, with their units, are in
 * docs/estimate.md.
 */
import { fail, readJsonInput } from './lib/cli';
import { estimateLayout, InvalidInputError, LENGTH_TOLERANCE_MM, type EstimateInput, type PlacedBox } from '../shared/estimate';
import { LAYER_HEIGHT_MAX_MM, LAYER_HEIGHT_MIN_MM, machineFieldDefaults, materialFieldDefaults } from '../shared/types/profiles';

const JOB_FORMAT = 'estimate-job/1';
const RESULT_FORMAT = 'estimate/1';

type Json = Record<string, unknown>;
const isObject = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v);
const isNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

function vec3(v: unknown, field: string, positive: boolean): [number, number, number] {
  if (!Array.isArray(v) || v.length !== 3) fail(`${field} must be an array of 3 numbers`);
  v.forEach((x, i) => {
    if (!isNumber(x) || (positive ? x <= 0 : x < 0)) fail(`${field}[${i}] must be a ${positive ? 'positive' : 'non-negative'} number`);
  });
  return v as [number, number, number];
}

function profileArray(v: unknown, field: string): number[] | undefined {
  if (v === undefined) return undefined;
  if (!Array.isArray(v)) fail(`${field} must be an array of numbers`);
  v.forEach((x, i) => {
    if (!isNumber(x) || x < 0) fail(`${field}[${i}] must be a non-negative number`);
  });
  return v as number[];
}

function readJob(file: string): Json {
  const json = readJsonInput(file, 'the job', 'estimate');
  if (!isObject(json)) fail('the job must be a JSON object');
  if (json.format !== JOB_FORMAT) fail(`format must be "${JOB_FORMAT}"`);
  return json;
}

function main(): void {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  if (args.length !== 1) fail('usage: estimate JOB.json (or - for standard input)');
  const job = readJob(args[0]);

  const layout = job.layout;
  if (!isObject(layout)) fail('layout must be a packing result (pack-result/1 or pack-result/2)');
  if (layout.format !== 'pack-result/1' && layout.format !== 'pack-result/2') fail('layout.format must be "pack-result/1" or "pack-result/2"');
  if (!Array.isArray(layout.placements)) fail('layout.placements must be an array');
  const placements: (PlacedBox & { id: string })[] = layout.placements.map((p: unknown, i: number) => {
    if (!isObject(p)) fail(`layout.placements[${i}] must be an object`);
    if (typeof p.id !== 'string' || p.id === '') fail(`layout.placements[${i}].id must be a non-empty string`);
    return { id: p.id, position: vec3(p.position, `layout.placements[${i}].position`, false), size: vec3(p.size, `layout.placements[${i}].size`, true) };
  });

  const instance = job.instance;
  if (!isObject(instance)) fail('instance must be the packing instance the layout answers');
  const chamber = vec3(instance.chamber, 'instance.chamber', true);
  const margin = isObject(instance.margin) ? instance.margin : {};
  for (const k of ['xy', 'bottom', 'top'] as const) {
    if (margin[k] !== undefined && (!isNumber(margin[k]) || (margin[k] as number) < 0)) fail(`instance.margin.${k} must be a non-negative number`);
  }
  const instanceLayer = instance.layerHeight ?? 0.1;
  if (!isNumber(instanceLayer) || instanceLayer <= 0) fail('instance.layerHeight must be a positive number');
  const layerHeight = job.layerHeight ?? instanceLayer;
  if (!isNumber(layerHeight) || layerHeight <= 0) fail('layerHeight must be a positive number');
  // The machines' range: the job's layer height joins the machine's list below.
  if (layerHeight < LAYER_HEIGHT_MIN_MM || layerHeight > LAYER_HEIGHT_MAX_MM) fail(`layerHeight must be from ${LAYER_HEIGHT_MIN_MM} to ${LAYER_HEIGHT_MAX_MM} mm, not ${layerHeight}`);

  // Every part inside the chamber: a box beyond it (or a height above it) is not a build of this chamber.
  placements.forEach((p, i) => {
    for (let a = 0; a < 3; a++) {
      const end = p.position[a] + p.size[a];
      if (end > chamber[a] + LENGTH_TOLERANCE_MM) fail(`layout.placements[${i}] reaches ${'xyz'[a]} = ${end} mm, outside the chamber's ${chamber[a]} mm`);
    }
  });
  if (layout.height !== undefined) {
    if (!isNumber(layout.height) || layout.height < 0) fail('layout.height must be a non-negative number');
    if (layout.height > chamber[2] + LENGTH_TOLERANCE_MM) fail(`layout.height must be at most the chamber's height (${chamber[2]} mm), not ${layout.height}`);
  }

  // Each part's own volume, for the parts' mass, the packing density and the cost per part.
  const volumeById: Record<string, number> = {};
  if (job.parts !== undefined) {
    if (!Array.isArray(job.parts)) fail('parts must be an array');
    job.parts.forEach((p: unknown, i: number) => {
      if (!isObject(p) || typeof p.id !== 'string') fail(`parts[${i}].id must be a string`);
      if (!isNumber(p.volumeMm3) || p.volumeMm3 <= 0) fail(`parts[${i}].volumeMm3 must be a positive number`);
      if (p.areaMm2 !== undefined && (!isNumber(p.areaMm2) || p.areaMm2 < 0)) fail(`parts[${i}].areaMm2 must be a non-negative number`);
      volumeById[p.id] = p.volumeMm3;
    });
    // A part's own volume fits in its box: more would be mass from nowhere (and a packing density over 1).
    placements.forEach((p) => {
      const volume = volumeById[p.id];
      const box = p.size[0] * p.size[1] * p.size[2];
      if (volume !== undefined && volume > box * (1 + 1e-6) + 1e-6) {
        const i = (job.parts as Json[]).findIndex((q) => q.id === p.id);
        fail(`parts[${i}].volumeMm3 (${volume}) is more than the box of its placements in the layout (${box} mm^3)`);
      }
    });
  }
  const partsVolumeMm3 = placements.reduce((s, p) => s + (volumeById[p.id] ?? p.size[0] * p.size[1] * p.size[2]), 0);

  if (!isObject(job.machine)) fail('machine must be an object of the machine profile fields (docs/estimate.md)');
  if (!isObject(job.material)) fail('material must be an object of the material profile fields (docs/estimate.md)');
  // The newer fields take the values a new profile starts with when the job leaves them out.
  // The cake stands on the instance's chamber and is spread at the job's layer height: a machine given without its
  // chamber or its layer heights is taken to be that chamber's, printing that layer.
  const machine: Json = { name: 'machine', ...machineFieldDefaults, chamberMm: chamber, layerHeightsMm: [layerHeight], ...job.machine };
  const material: Json = { name: 'material', ...materialFieldDefaults, ...job.material };
  // The layer height is the job's choice; the machine need not list it.
  const heights = machine.layerHeightsMm;
  if (Array.isArray(heights) && !heights.includes(layerHeight)) machine.layerHeightsMm = [...heights, layerHeight].slice(-20);

  const areaProfile = profileArray(layout.areaProfile, 'layout.areaProfile');
  const contourProfile = profileArray(layout.contourProfile, 'layout.contourProfile');
  const height = isNumber(layout.height) ? layout.height : undefined;
  // One number per layer of the instance's layer height, from the floor to the top of the highest part (the
  // packing contract): a shorter profile would leave the layers above it unscanned.
  const top = height ?? placements.reduce((h, p) => Math.max(h, p.position[2] + p.size[2]), 0);
  const perLayer = Math.ceil(top / instanceLayer - 1e-9);
  for (const [field, profile] of [['layout.areaProfile', areaProfile], ['layout.contourProfile', contourProfile]] as const) {
    if (profile && Math.abs(profile.length - perLayer) > 1) {
      fail(`${field} must hold one number per layer, ${perLayer} (the layout's ${top} mm over the instance's layer height of ${instanceLayer} mm), not ${profile.length}`);
    }
  }
  // No layer's cross-section is larger than the chamber's floor.
  const floorMm2 = chamber[0] * chamber[1];
  const tooLarge = areaProfile ? areaProfile.findIndex((a) => a > floorMm2 * (1 + 1e-9)) : -1;
  if (tooLarge >= 0) fail(`layout.areaProfile[${tooLarge}] (${areaProfile![tooLarge]} mm^2) is more than the chamber's floor (${floorMm2} mm^2)`);
  // Nor longer in outline than walls 0.1 mm thick filling that floor (2 x floor / 0.1 mm): no printed wall is that
  // thin, the laser's spot alone is a few tenths of a millimetre wide (common practice).
  const outlineMm = (2 * floorMm2) / 0.1;
  const tooLong = contourProfile ? contourProfile.findIndex((c) => c > outlineMm) : -1;
  if (tooLong >= 0) fail(`layout.contourProfile[${tooLong}] (${contourProfile![tooLong]} mm) is longer than any section of the chamber's floor could be (${outlineMm} mm, walls 0.1 mm thick)`);

  let estimate;
  try {
    estimate = estimateLayout({
      layout: {
        placements,
        heightMm: height,
        margin: {
          xy: (margin.xy as number | undefined) ?? 0,
          bottom: (margin.bottom as number | undefined) ?? 0,
          top: (margin.top as number | undefined) ?? 0,
        },
      },
      // Checked field by field by the estimate itself (a wrong one exits 2 naming it).
      machine: machine as unknown as EstimateInput['machine'],
      material: material as unknown as EstimateInput['material'],
      layerHeightMm: layerHeight,
      areaPerLayerMm2: areaProfile,
      contourPerLayerMm: contourProfile,
      profileLayerHeightMm: areaProfile || contourProfile ? instanceLayer : undefined,
      partsVolumeMm3,
      volumeById,
      cakeBaseMm: [chamber[0], chamber[1]],
    });
  } catch (e) {
    if (e instanceof InvalidInputError) fail(`${e.problems[0].field} ${e.problems[0].message}`);
    throw e;
  }

  // Boxes that overlap can hold more than the cake: no layout of this chamber does.
  if (estimate.partsVolumeMm3 > estimate.cakeVolumeMm3 * (1 + 1e-9)) {
    fail(`layout.placements hold more than the cake (${estimate.partsVolumeMm3} mm^3 of parts in ${estimate.cakeVolumeMm3} mm^3): the parts overlap`);
  }
  const result = {
    format: RESULT_FORMAT,
    layers: estimate.layerCount,
    print: {
      totalS: estimate.print.preheatSeconds + estimate.print.layersSeconds,
      preheatS: estimate.print.preheatSeconds,
      recoatS: estimate.print.recoatSeconds,
      scanS: estimate.print.scanSeconds,
      contourS: estimate.print.contourSeconds,
      otherS: estimate.print.otherSeconds,
      scanSpeedMmPerS: estimate.print.scanSpeedMmPerS,
      scanSpeedCapped: estimate.print.scanSpeedCapped,
    },
    cooling: { inMachineS: estimate.cooling.inMachineSeconds, outsideS: estimate.cooling.outsideSeconds, model: estimate.cooling.model },
    powder: {
      cakeKg: estimate.powder.cakeMassKg,
      partsKg: estimate.powder.partsMassKg,
      looseKg: estimate.powder.looseMassKg,
      freshKg: estimate.powder.freshPowderKg,
      reusedKg: estimate.powder.reusedPowderKg,
      lossKg: estimate.powder.lossKg,
      fillKg: estimate.powder.fillKg,
    },
    packingDensity: estimate.cakeVolumeMm3 > 0 ? estimate.partsVolumeMm3 / estimate.cakeVolumeMm3 : 0,
    cost: { totalBuild: estimate.cost.totalCost, perPart: estimate.cost.perPart.map((p) => ({ id: p.id, each: p.each, count: p.count })) },
    profileSource: estimate.profileSource,
  };
  process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
}

main();
