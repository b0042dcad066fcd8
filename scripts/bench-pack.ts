/**
 * Packing benchmark: `npm run bench:pack`. Prints, side by side, our engine
 * and the general-purpose binpackingjs library on
 *  - BR1-BR3 container loading (Bischoff & Ratcliff, Omega 23(4), 1995), max-volume, no spacing;
 *  - BR1-BR3 as strip packing (base 587 x 233, height open): used volume / (base x height);
 *  - generated powder-bed builds (min-height, 3 mm spacing): height / lower bound;
 *  - the time of the first valid layout as builds grow, and peak memory;
 *  - concave mixes (brackets, channels, open housings, clips, rings, small solids) packed by box and by
 *    shape at the same spacing and time: heights, their ratio, packing density, the first shape layout;
 *  - parts that stack (tapered cups, alone and in a concave mix) by box, by shape and by shape without stacks.
 * Options: --problems N (per BR set, default 10), --ms T (our time per instance, default 2000),
 * --slow (also binpackingjs on 2,000 parts: one fill takes minutes), --shapes (only the concave mixes),
 * --shape-ms T (time per concave mix and fit, default 10000), --seeds 4,5,6 (other concave mixes than seeds 1-3), --sizes 300,1000 (their part counts), --limit-ms T (one limit for every size),
 * --fine (the same mixes with their curved parts finely tessellated: clips of about 6,000 triangles, rings of about 37,000),
 * --no-manifold (the concave mixes checked by the validator only; manifold-3d's check of finely tessellated ones takes minutes a mix), --heavy (only the time limit with heavy meshes:
 * two rings of a million triangles each and a housing, by shape at 2 s and 10 s; then many light parts at 2 s, by shape and by box), --stacks (only the parts that
 * stack: tapered cups alone and in a mix, by box, by shape, by shape without stacks).
 */
import { execSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { cpus } from 'node:os';
import { join } from 'node:path';
import { pack3D, RotationType } from 'binpackingjs/3d';
import { bracket, clip, gear, housing, measureMesh, mountPlate, taperedCup, torus, type MeshData } from '../shared/geometry';
import {
  boxMesh,
  createPacking,
  createPackingV2,
  createShapePacking,
  createRandom,
  generateShapeMix,
  shapeLowerBound,
  shapeParts,
  validateShapeLayout,
  generatePowderBed,
  lowerBound,
  parseBischoffRatcliff,
  parseInstanceV2,
  validateLayout,
  type Orientation,
  type PackInstance,
  type PackInstanceV2,
  type PackResult,
  type PackResultV2,
} from '../shared/packing';
import { reference, referenceFaults } from './lib/manifold-check';

const arg = (name: string, fallback: number) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? Number(process.argv[i + 1]) : fallback;
};
const PROBLEMS = arg('problems', 10);
const MS = arg('ms', 2000);
/** binpackingjs on 2,000 parts takes minutes for one fill: only with --slow. */
const SLOW = process.argv.includes('--slow');
const SHAPES_ONLY = process.argv.includes('--shapes');
const HEAVY_ONLY = process.argv.includes('--heavy');
const STACKS_ONLY = process.argv.includes('--stacks');
/** --fine: the concave mixes' curved parts finely tessellated (generateShapeMix's `fine`), the same parts otherwise. */
const FINE = process.argv.includes('--fine');
/** --no-manifold: the concave mixes' layouts checked by the validator only (manifold-3d's check of finely tessellated ones takes minutes a mix). */
const MANIFOLD = !process.argv.includes('--no-manifold');
const SHAPE_MS = arg('shape-ms', 10_000);
/** 2,000 parts by shape: the exact check of one layout alone takes seconds, so they get 4 times the time. */
const SHAPE_MS_2000 = 4 * SHAPE_MS;
/** --limit-ms T: one time limit for every concave mix, whatever its size (the contract's default is 2,000 ms). */
const LIMIT_MS = arg('limit-ms', NaN);
/** A comma-separated list of whole numbers from 1 given as --name (null when not given). */
const wholeList = (name: string, example: string): number[] | null => {
  const i = process.argv.indexOf(`--${name}`);
  if (i < 0) return null;
  const list = String(process.argv[i + 1] ?? '').split(',').map(Number);
  if (list.length === 0 || list.some((x) => !Number.isInteger(x) || x < 1)) throw new Error(`--${name}: whole numbers from 1, comma-separated (${example})`);
  return list;
};
/** --sizes 300,1000: the concave mixes' part counts (default 100, 300, 500 and 2,000); above 500 parts, the larger chamber. */
const SIZES = wholeList('sizes', '300,1000');
/** --seeds 4,5,6: other concave mixes than the usual ones (seeds 1-3, and 1 for 2,000 parts), to see the figures hold on mixes the packing was not shaped on. */
const SEEDS = wholeList('seeds', '4,5,6');

let peakRss = 0;
let peakHeap = 0;
const sampleMemory = () => {
  const m = process.memoryUsage();
  peakRss = Math.max(peakRss, m.rss);
  peakHeap = Math.max(peakHeap, m.heapUsed);
};

/** A run of either engine, timed: when its first layout came, when it ended; memory sampled as it goes. */
function timed<R>(runSync: (hooks: { onProgress(phase: unknown, share: number, best: unknown): void }) => R): { result: R; firstLayoutMs: number; wallMs: number } {
  let firstLayoutMs = -1;
  const t0 = performance.now();
  let lastSample = 0;
  const result = runSync({
    onProgress(_phase, _share, best) {
      const t = performance.now() - t0;
      if (best && firstLayoutMs < 0) firstLayoutMs = t;
      if (t - lastSample > 100) {
        lastSample = t;
        sampleMemory();
      }
    },
  });
  const wallMs = performance.now() - t0;
  sampleMemory();
  return { result, firstLayoutMs, wallMs };
}

function ours(instance: PackInstance): { result: PackResult; firstLayoutMs: number; wallMs: number; valid: boolean } {
  const run = timed((hooks) => createPacking(instance).runSync(hooks));
  return { ...run, valid: validateLayout(instance, run.result).length === 0 };
}

/**
 * binpackingjs on an instance: boxes and container grown by the spacing (it has
 * no spacing of its own); its height axis is our z. A rotation is allowed when
 * the part axis it puts upright is one our orientations allow upright.
 */
function theirs(instance: PackInstance, usableHeight: number): { placedVolume: number; placed: number; topZ: number; ms: number } {
  const g = instance.spacing;
  const ux = instance.chamber[0] - 2 * instance.margin.xy;
  const uy = instance.chamber[1] - 2 * instance.margin.xy;
  // For binpackingjs an item is (width, height, depth) = our (x, z, y); which part axis each rotation stands upright:
  const uprightOf: Record<number, number> = {
    [RotationType.WHD]: 2,
    [RotationType.HWD]: 0,
    [RotationType.HDW]: 1,
    [RotationType.DHW]: 2,
    [RotationType.DWH]: 0,
    [RotationType.WDH]: 1,
  };
  const items = [];
  for (const part of instance.parts) {
    const upright = new Set(part.orientations.map((o) => 'xyz'.indexOf(o[2])));
    const allowedRotations = Object.entries(uprightOf)
      .filter(([, axis]) => upright.has(axis))
      .map(([r]) => Number(r) as RotationType);
    for (let k = 0; k < part.quantity; k++) {
      items.push({
        name: part.id,
        width: part.size[0] + g,
        height: part.size[2] + g,
        depth: part.size[1] + g,
        weight: 0,
        allowedRotations,
      });
    }
  }
  const t0 = performance.now();
  const out = pack3D({ bins: [{ name: 'chamber', width: ux + g, height: usableHeight + g, depth: uy + g, maxWeight: 1e12 }], items });
  const ms = performance.now() - t0;
  let placedVolume = 0;
  let topZ = 0;
  const bin = out.packedBins[0];
  for (const it of bin.items) {
    const [a, b, c] = it.dimension;
    placedVolume += (a - g) * (b - g) * (c - g);
    topZ = Math.max(topZ, it.position[1] + b - g);
  }
  sampleMemory();
  return { placedVolume, placed: bin.items.length, topZ, ms };
}

/** Smallest usable height at which binpackingjs places every part, by bisection. */
function theirsLowest(instance: PackInstance, maxHeight: number, budgetMs: number): { height: number | null; ms: number } {
  const total = instance.parts.reduce((s, p) => s + p.quantity, 0);
  const t0 = performance.now();
  const full = theirs(instance, maxHeight);
  if (full.placed < total) return { height: null, ms: performance.now() - t0 };
  let hi = full.topZ;
  let lo = Math.max(0, lowerBound(instance) - instance.margin.bottom);
  let best = hi;
  while (hi - lo > 0.5 && performance.now() - t0 < budgetMs) {
    const mid = (lo + hi) / 2;
    const r = theirs(instance, mid);
    if (r.placed === total) {
      best = Math.min(best, r.topZ);
      hi = Math.min(mid, r.topZ);
    } else lo = mid;
  }
  return { height: instance.margin.bottom + best, ms: performance.now() - t0 };
}

const pct = (v: number) => `${(100 * v).toFixed(1)} %`;
const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : NaN);

function table(header: string[], rows: Array<Array<string | number>>): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => String(r[i]).length)));
  const line = (cells: Array<string | number>) => `| ${cells.map((c, i) => String(c).padEnd(widths[i])).join(' | ')} |`;
  return [line(header), `|${widths.map((w) => '-'.repeat(w + 2)).join('|')}|`, ...rows.map(line)].join('\n');
}

function machine(): string {
  let model = cpus()[0]?.model ?? 'unknown';
  try {
    model = execSync("grep -m1 'model name' /proc/cpuinfo", { encoding: 'utf8' }).split(':')[1].trim();
  } catch {
    // not Linux: keep the os module's name
  }
  let nproc = String(cpus().length);
  try {
    nproc = execSync('nproc', { encoding: 'utf8' }).trim();
  } catch {
    // keep the count from the os module
  }
  return `node ${process.version}, ${nproc} CPUs (nproc), ${model}`;
}

function oursV2(instance: PackInstanceV2): { result: PackResultV2; firstLayoutMs: number; wallMs: number } {
  return timed((hooks) => createPackingV2(instance).runSync(hooks));
}

/**
 * Concave mixes packed by box and by shape, same instance, spacing and time. Every shape layout is checked
 * against the meshes (surface gaps, containment, lift-out order) by the validator, apart from the engine's run, and
 * again by manifold-3d (./lib/manifold-check.ts), which shares no code with it.
 * Density: the parts' mesh volume over the cake (usable base x height above the floor margin).
 * Floor: the height under which no packing of the parts can end (the tallest part in its lowest turn, or their
 * volume spread over the base; shapeLowerBound) over the box height: the least shape / box ratio reachable at all.
 */
function shapeSection(): void {
  const rows: Array<Array<string | number>> = [];
  // 2,000 parts and more: one mix (the first seed).
  const runs: Array<[number, number[]]> = (SIZES ?? [100, 300, 500, 2000]).map((n) => [n, n >= 2000 ? [SEEDS?.[0] ?? 1] : (SEEDS ?? [1, 2, 3])]);
  for (const [count, seeds] of runs) {
    const ratio: number[] = [];
    const boxDensity: number[] = [];
    const shapeDensity: number[] = [];
    const first: number[] = [];
    const boxH: number[] = [];
    const shapeH: number[] = [];
    const floor: number[] = [];
    let invalid = 0;
    let invalidByReference = 0;
    let referenceMs = 0;
    let unplaced = 0;
    const ms = Number.isFinite(LIMIT_MS) ? LIMIT_MS : count > 500 ? SHAPE_MS_2000 : SHAPE_MS;
    let longest = 0;
    for (const seed of seeds) {
      const chamber: [number, number, number] = count > 500 ? [400, 400, 700] : [300, 300, 380];
      const byBox = oursV2(generateShapeMix({ parts: count, seed, chamber, fit: 'box', timeLimitMs: ms, fine: FINE }));
      const instance = generateShapeMix({ parts: count, seed, chamber, fit: 'shape', timeLimitMs: ms, fine: FINE });
      const byShape = oursV2(instance);
      longest = Math.max(longest, byShape.wallMs / ms);
      const parts = shapeParts(instance);
      if (validateShapeLayout(instance, byShape.result, parts).length > 0) invalid++;
      // No packing of these parts can end lower (../shared/packing/shape/bound.ts): over the box height, the least ratio any could reach.
      floor.push(shapeLowerBound(instance, parts).height / byBox.result.height);
      // The same layout measured by a second implementation (manifold-3d), which shares no code with the validator.
      const t = performance.now();
      const faults = MANIFOLD ? referenceFaults(instance, reference(instance, byShape.result)) : [];
      referenceMs += performance.now() - t;
      if (faults.length > 0) {
        invalidByReference++;
        console.error(`${count} parts, mix ${seed}: manifold-3d finds ${faults.length} faults, such as ${faults[0]}`);
      }
      unplaced += byShape.result.unplaced.reduce((n, u) => n + u.count, 0) + byBox.result.unplaced.reduce((n, u) => n + u.count, 0);
      boxH.push(byBox.result.height);
      shapeH.push(byShape.result.height);
      ratio.push(byShape.result.height / byBox.result.height);
      boxDensity.push(byBox.result.utilization);
      shapeDensity.push(byShape.result.utilization);
      first.push(byShape.firstLayoutMs);
    }
    rows.push([
      count,
      seeds.length,
      `${mean(boxH).toFixed(1)} mm`,
      `${mean(shapeH).toFixed(1)} mm`,
      mean(ratio).toFixed(3),
      Math.max(...ratio).toFixed(3),
      `${mean(floor).toFixed(3)} / ${Math.max(...floor).toFixed(3)}`,
      `${pct(mean(boxDensity))} / ${pct(mean(shapeDensity))}`,
      `${(mean(first) / 1000).toFixed(1)} s / ${(Math.max(...first) / 1000).toFixed(1)} s`,
      `${+(ms / 1000).toFixed(1)} s`,
      longest.toFixed(2),
      unplaced,
      MANIFOLD ? `${invalid} / ${invalidByReference} (${(referenceMs / 1000).toFixed(0)} s)` : `${invalid} / not run`,
    ]);
  }
  console.log(
    `\n## Concave mixes by box and by shape (3 mm spacing, the same time for both; 300 x 300 x 380 chamber, 400 x 400 x 700 for more than 500 parts${SEEDS ? `; mixes of seeds ${SEEDS.join(', ')}` : ''}${FINE ? '; curved parts finely tessellated' : ''})\n`,
  );
  console.log(
    table(
      ['parts', 'seeds', 'box height', 'shape height', 'shape / box mean', 'worst', 'floor / box mean / most', 'density box / shape', 'first shape layout mean / worst', 'time limit', 'longest run / limit', 'unplaced', 'invalid: validator / manifold-3d (its time)'],
      rows,
    ),
  );
}

/**
 * Parts that stack: three round cups wider at the rim than at the foot (generateShapeMix's `cups`), alone and in a
 * concave mix, packed by box, by shape, and by shape with stacks turned off (their copies then nest only as far as
 * the plan grid lets them). Each shape layout is checked against the meshes.
 */
function stackSection(): void {
  const rows: Array<Array<string | number>> = [];
  const cases: Array<[string, { parts: number; seed: number; cups: number }]> = [
    ['3 cups x 60 copies', { parts: 0, seed: 1, cups: 60 }],
    ['200 parts (seed 3) and 3 cups x 40', { parts: 200, seed: 3, cups: 40 }],
  ];
  for (const [name, o] of cases) {
    const instance = generateShapeMix({ ...o, fit: 'shape', timeLimitMs: SHAPE_MS });
    const byBox = oursV2({ ...instance, fit: 'box' });
    const byShape = oursV2(instance);
    const noStacks = timed((hooks) => createShapePacking(instance, { stacks: false }).runSync(hooks));
    const parts = shapeParts(instance);
    const invalid = [byShape, noStacks].filter((r) => validateShapeLayout(instance, r.result, parts).length > 0).length;
    rows.push([
      name,
      `${byBox.result.height.toFixed(1)} mm`,
      `${byShape.result.height.toFixed(1)} mm`,
      `${noStacks.result.height.toFixed(1)} mm`,
      (byShape.result.height / byBox.result.height).toFixed(3),
      `${(Math.max(byShape.wallMs, noStacks.wallMs) / SHAPE_MS).toFixed(2)}`,
      invalid,
    ]);
  }
  console.log(`\n## Parts that stack (tapered cups; 3 mm spacing, ${SHAPE_MS / 1000} s each; 300 x 300 x 380 chamber)\n`);
  console.log(table(['mix', 'box height', 'shape height', 'shape, no stacks', 'shape / box', 'longest run / limit', 'invalid'], rows));
}

/**
 * The time limit with heavy meshes: ten copies each of two rings of 1,000,000 triangles and of a housing, by shape.
 * When the meshes cannot be made ready in time, the engine packs their boxes and says so ("packed-by-box").
 */
function heavySection(): void {
  const meshes = [torus(20, 5, 1000, 500), torus(12, 3, 1000, 500), housing({ lengthMm: 80, widthMm: 50, heightMm: 30, wallMm: 2, floorMm: 2, cornerRadiusMm: 5, cornerSegments: 250 })];
  const parts = meshes.map((mesh, i) => ({ id: `heavy-${i + 1}`, size: measureMesh(mesh).sizeMm as [number, number, number], quantity: 10, rotations: Array.from({ length: 24 }, (_, k) => k), meshPath: null, mesh }));
  const rows: Array<Array<string | number>> = [];
  for (const limit of [2000, 10_000]) {
    const instance: PackInstanceV2 = { format: 'pack-instance/2', chamber: [300, 300, 380], margin: { xy: 8, bottom: 5, top: 5 }, spacing: 3, layerHeight: 0.12, objective: 'min-height', timeLimitMs: limit, seed: 1, fit: 'shape', parts };
    const run = oursV2(instance);
    const byBox = run.result.warnings?.some((w) => w.code === 'packed-by-box');
    rows.push([`${limit / 1000} s`, `${(run.firstLayoutMs / 1000).toFixed(1)} s`, `${(run.wallMs / 1000).toFixed(1)} s`, byBox ? 'boxes (said so)' : 'shapes', `${run.result.height.toFixed(1)} mm`]);
  }
  const triangles = meshes.reduce((n, m) => n + m.indices.length / 3, 0);
  console.log(`\n## Heavy meshes by shape: 3 parts of ${triangles.toLocaleString('en-US')} triangles in all, 10 copies each\n`);
  console.log(table(['time limit', 'first layout', 'wall', 'packed by', 'height'], rows));
  midSection();
  manySection();
}

/**
 * Parts of 1,000 to 49,000 triangles, as design tools export curved parts (248 parts of 26 designs: open housings,
 * tapered cups, gears, clips, rings, brackets, mounting plates; 3.1 million triangles placed), by box and by shape at
 * 10 s. Between the light mixes and the heavy meshes above: the exact check of a layout with nests takes seconds
 * here, and the packing by shape has to foresee it to nest at all.
 */
function midSection(): void {
  const r = createRandom(7);
  const between = (a: number, b: number) => a + (b - a) * r();
  const designs: Array<[string, MeshData, number]> = [];
  for (let i = 0; i < 4; i++) designs.push([`housing-${i}`, housing({ lengthMm: between(50, 100), widthMm: between(35, 60), heightMm: between(18, 35), wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 6, cornerSegments: 96 }), 8]);
  for (let i = 0; i < 3; i++) {
    const foot = between(15, 25);
    designs.push([`cup-${i}`, taperedCup({ bottomRadiusMm: foot, topRadiusMm: foot + between(5, 12), heightMm: between(25, 45), wallMm: 2, floorMm: 2, segments: 1024 }), 8]);
  }
  for (let i = 0; i < 4; i++) {
    const root = between(12, 25);
    designs.push([`gear-${i}`, gear({ teeth: 20 + 8 * i, rootRadiusMm: root, tipRadiusMm: root + 2.5, boreRadiusMm: 4, thicknessMm: between(5, 10), samplesPerTooth: 48 }), 10]);
  }
  for (let i = 0; i < 3; i++) designs.push([`clip-${i}`, clip({ innerRadiusMm: between(5, 14), wallMm: 2.5, gapDeg: 60, widthMm: between(8, 16), segments: 768 }), 20]);
  for (let i = 0; i < 3; i++) designs.push([`ring-${i}`, torus(between(12, 20), between(2.5, 4), 512, 48), 12]);
  for (let i = 0; i < 3; i++) designs.push([`bracket-${i}`, bracket({ legAMm: between(25, 45), legBMm: between(20, 40), thicknessMm: 4, widthMm: between(12, 24), gussetMm: 6 }), 12]);
  for (let i = 0; i < 2; i++) designs.push([`plate-${i}`, mountPlate({ sizeMm: between(30, 50), thicknessMm: 4, cornerRadiusMm: 4, holeSpacingMm: 22, holeRadiusMm: 1.7, boreRadiusMm: 8, segments: 512 }), 10]);
  const parts = designs.map(([id, mesh, quantity]) => ({ id, size: measureMesh(mesh).sizeMm as [number, number, number], quantity, rotations: Array.from({ length: 24 }, (_, k) => k), meshPath: null, mesh }));
  const triangles = parts.reduce((n, p) => n + p.quantity * (p.mesh.indices.length / 3), 0);
  const placed = parts.reduce((n, p) => n + p.quantity, 0);
  const rows: Array<Array<string | number>> = [];
  for (const fit of ['box', 'shape'] as const) {
    const instance: PackInstanceV2 = { format: 'pack-instance/2', chamber: [300, 300, 380], margin: { xy: 8, bottom: 5, top: 5 }, spacing: 3, layerHeight: 0.1, objective: 'min-height', timeLimitMs: 10_000, seed: 1, fit, parts };
    const run = oursV2(instance);
    const invalid = validateShapeLayout(instance, run.result).length > 0;
    const byBox = run.result.warnings?.some((w) => w.code === 'packed-by-box');
    rows.push([fit, `${(run.firstLayoutMs / 1000).toFixed(1)} s`, `${(run.wallMs / 1000).toFixed(1)} s`, fit === 'shape' ? (byBox ? 'boxes (said so)' : 'shapes') : 'boxes', `${run.result.height.toFixed(1)} mm`, invalid ? 'invalid' : 'valid']);
  }
  console.log(`\n## Parts of 1,000 to 49,000 triangles: ${placed} parts, ${triangles.toLocaleString('en-US')} triangles placed, 10 s\n`);
  console.log(table(['fit', 'first layout', 'wall', 'packed by', 'height', 'exact check'], rows));
}

/**
 * Many light parts by shape at the spec's default limit (2 s): the box engine's first layout, then settling it and
 * the exact check, which grow with the placements. A run hands out the boxes' layout as it stands (said so) when
 * those do not fit in the limit, instead of running past it.
 */
function manySection(): void {
  const cube = boxMesh([5, 5, 5]);
  const cubes = (quantity: number): PackInstanceV2 => {
    const parsed = parseInstanceV2({ format: 'pack-instance/2', chamber: [340, 340, 600], margin: { xy: 5, bottom: 5, top: 5 }, spacing: 2, layerHeight: 0.1, timeLimitMs: 2000, fit: 'shape', parts: [{ id: 'cube', mesh: cube, quantity }] });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    return parsed.instance;
  };
  const cases: Array<[string, PackInstanceV2]> = [
    ['2,000 parts of the concave mix (seed 1; 400 x 400 x 700)', generateShapeMix({ parts: 2000, seed: 1, chamber: [400, 400, 700], fit: 'shape', timeLimitMs: 2000 })],
    ['5,000 parts of the concave mix (seed 1; 400 x 400 x 700)', generateShapeMix({ parts: 5000, seed: 1, chamber: [400, 400, 700], fit: 'shape', timeLimitMs: 2000 })],
    ['20,000 cubes of 5 mm (340 x 340 x 600, 2 mm apart)', cubes(20_000)],
    ['200,000 cubes of 5 mm (the same chamber)', cubes(200_000)],
  ];
  const rows = cases.map(([name, instance]) => {
    const run = oursV2(instance);
    const byBox = run.result.warnings?.some((w) => w.code === 'packed-by-box');
    // The same parts asked by box (fit "box"): its layouts are turned into version 2 records too, within the limit.
    const box = oursV2({ ...instance, fit: 'box' });
    return [
      name,
      run.result.placements.length.toLocaleString('en-US'),
      `${(run.firstLayoutMs / 1000).toFixed(1)} s`,
      `${(run.wallMs / 1000).toFixed(1)} s`,
      byBox ? 'boxes (said so)' : 'shapes',
      `${run.result.height.toFixed(1)} mm`,
      `${(box.wallMs / 1000).toFixed(1)} s, ${box.result.height.toFixed(1)} mm`,
    ];
  });
  console.log('\n## Many parts by shape at the default limit (2 s), and asked by box\n');
  console.log(table(['instance', 'placed', 'first layout', 'wall', 'packed by', 'height', 'by box: wall, height'], rows));
}

function main(): void {
  const started = performance.now();
  if (HEAVY_ONLY || STACKS_ONLY) {
    console.log(`# Packing benchmark\n\nMachine: ${machine()}`);
    if (HEAVY_ONLY) heavySection();
    else stackSection();
    return;
  }
  console.log(`# Packing benchmark\n\nMachine: ${machine()}\nOur time limit: ${MS} ms per instance; BR sample: the first ${PROBLEMS} problems of each set.\n`);
  if (SHAPES_ONLY) {
    shapeSection();
    sampleMemory();
    console.log(`\nPeak memory: rss ${(peakRss / 1048576).toFixed(0)} MB, heapUsed ${(peakHeap / 1048576).toFixed(0)} MB`);
    console.log(`Total benchmark time: ${((performance.now() - started) / 1000).toFixed(0)} s`);
    return;
  }

  // 1. Container loading.
  const brDir = join(__dirname, '..', 'tests', 'unit', 'packing', 'fixtures');
  const brRows: Array<Array<string | number>> = [];
  const allOurs: number[] = [];
  const allTheirs: number[] = [];
  const sets = [1, 2, 3].map((set) => ({ set, problems: parseBischoffRatcliff(readFileSync(join(brDir, `br${set}.txt`), 'utf8'), MS).slice(0, PROBLEMS) }));
  for (const { set, problems } of sets) {
    const u: number[] = [];
    const t: number[] = [];
    const bu: number[] = [];
    const bt: number[] = [];
    let invalid = 0;
    for (const { instance } of problems) {
      const r = ours(instance);
      if (!r.valid) invalid++;
      u.push(r.result.utilization);
      t.push(r.wallMs);
      const b = theirs(instance, instance.chamber[2]);
      bu.push(b.placedVolume / (instance.chamber[0] * instance.chamber[1] * instance.chamber[2]));
      bt.push(b.ms);
    }
    allOurs.push(...u);
    allTheirs.push(...bu);
    brRows.push([`BR${set}`, problems.length, pct(mean(u)), pct(Math.min(...u)), `${mean(t).toFixed(0)} ms`, invalid, pct(mean(bu)), `${mean(bt).toFixed(0)} ms`]);
  }
  brRows.push(['BR1-3', allOurs.length, pct(mean(allOurs)), pct(Math.min(...allOurs)), '', '', pct(mean(allTheirs)), '']);
  console.log('## Container loading (max-volume, no spacing): volume utilisation\n');
  console.log(table(['set', 'problems', 'ours mean', 'ours min', 'ours time', 'invalid', 'binpackingjs mean', 'binpackingjs time'], brRows));

  // 2. Strip packing: the same boxes, the base of the container, the height open.
  const stripRows: Array<Array<string | number>> = [];
  for (const { set, problems } of sets) {
    const u: number[] = [];
    const ratio: number[] = [];
    const bu: number[] = [];
    let invalid = 0;
    for (const { instance } of problems) {
      const boxVolume = instance.parts.reduce((s, p) => s + p.quantity * p.size[0] * p.size[1] * p.size[2], 0);
      const open: PackInstance = { ...instance, objective: 'min-height', chamber: [587, 233, 4 * Math.ceil(boxVolume / (587 * 233)) + 400] };
      const r = ours(open);
      if (!r.valid || r.result.unplaced.length > 0) invalid++;
      u.push(r.result.utilization);
      ratio.push(r.result.height / lowerBound(open));
      const b = theirsLowest(open, open.chamber[2], 8_000);
      bu.push(b.height ? boxVolume / (587 * 233 * b.height) : 0);
    }
    stripRows.push([`BR${set}`, problems.length, pct(mean(u)), mean(ratio).toFixed(3), invalid, pct(mean(bu))]);
  }
  console.log('\n## Strip packing (base 587 x 233, height open): used volume / (base x height)\n');
  console.log(table(['set', 'problems', 'ours', 'ours height / lower bound', 'invalid or unplaced', 'binpackingjs'], stripRows));

  // 3. Powder-bed builds, lowest height.
  const sizes: Array<[number, [number, number, number], number]> = [
    [200, [300, 300, 380], 0.75],
    [500, [300, 300, 380], 0.75],
    [1000, [340, 340, 600], 0.75],
    [2000, [340, 340, 600], 0.8],
    [5000, [340, 340, 600], 0.95],
  ];
  const bedRows: Array<Array<string | number>> = [];
  const growth: Array<Array<string | number>> = [];
  for (const [count, chamber, clipShare] of sizes) {
    const ratios: number[] = [];
    const first: number[] = [];
    const wall: number[] = [];
    const theirsRatio: string[] = [];
    let invalid = 0;
    let unplaced = 0;
    for (const seed of [1, 2, 3]) {
      const instance = generatePowderBed({ parts: count, seed, chamber, timeLimitMs: MS, clipShare });
      const lb = lowerBound(instance);
      const r = ours(instance);
      if (!r.valid) invalid++;
      unplaced += r.result.unplaced.reduce((s, u) => s + u.count, 0);
      ratios.push(r.result.height / lb);
      first.push(r.firstLayoutMs);
      wall.push(r.wallMs);
      if (seed === 1 && count <= 1000) {
        const b = theirsLowest(instance, chamber[2] - 10, 30_000);
        theirsRatio.push(b.height ? `${(b.height / lb).toFixed(3)} (bisection, ${(b.ms / 1000).toFixed(1)} s)` : 'does not fit');
      } else if (seed === 1 && count <= 2000 && SLOW) {
        // One call takes several seconds here: report its height in the full chamber instead of bisecting.
        const b = theirs(instance, chamber[2] - 10);
        const total = instance.parts.reduce((s, p) => s + p.quantity, 0);
        theirsRatio.push(b.placed === total ? `${((instance.margin.bottom + b.topZ) / lb).toFixed(3)} (one fill, ${(b.ms / 1000).toFixed(1)} s)` : `${total - b.placed} unplaced (${(b.ms / 1000).toFixed(1)} s)`);
      }
    }
    bedRows.push([count, chamber.join(' x '), mean(ratios).toFixed(3), Math.max(...ratios).toFixed(3), `${mean(wall).toFixed(0)} ms`, unplaced, invalid, theirsRatio[0] ?? (count <= 2000 ? 'not run (minutes a fill; --slow)' : 'not run (too slow)')]);
    growth.push([count, `${mean(first).toFixed(0)} ms`, `${Math.max(...first).toFixed(0)} ms`]);
  }
  console.log('\n## Powder-bed builds (min-height, 3 mm spacing, margins xy 8 / bottom 5 / top 5; 3 seeds each): height / lower bound\n');
  console.log(table(['parts', 'chamber', 'ours mean', 'ours worst', 'ours time', 'unplaced', 'invalid', 'binpackingjs (seed 1)'], bedRows));
  // Distinct parts (one copy each) cannot be grouped into blocks: the hardest case for the first layout.
  {
    const random = createRandom(7);
    const parts = Array.from({ length: 5000 }, (_, i) => ({
      id: `part-${i + 1}`,
      size: [5 + 30 * random(), 5 + 20 * random(), 3 + 10 * random()] as [number, number, number],
      quantity: 1,
      orientations: ['xyz', 'xzy', 'yxz', 'yzx', 'zxy', 'zyx'] as Orientation[],
    }));
    const instance: PackInstance = { ...generatePowderBed({ parts: 1, seed: 1, chamber: [340, 340, 600], timeLimitMs: MS }), parts };
    const r = ours(instance);
    growth.push(['5000 distinct', `${r.firstLayoutMs.toFixed(0)} ms`, `${r.firstLayoutMs.toFixed(0)} ms (height / lower bound ${(r.result.height / lowerBound(instance)).toFixed(3)} at ${r.wallMs.toFixed(0)} ms${r.valid ? '' : ', INVALID'})`]);
  }
  console.log('\n## Time to the first valid layout (3 seeds; the last row: 5,000 parts of distinct sizes, one run)\n');
  console.log(table(['parts', 'mean', 'worst'], growth));

  shapeSection();
  stackSection();

  sampleMemory();
  console.log(`\nPeak memory: rss ${(peakRss / 1048576).toFixed(0)} MB, heapUsed ${(peakHeap / 1048576).toFixed(0)} MB`);
  console.log(`Total benchmark time: ${((performance.now() - started) / 1000).toFixed(0)} s`);
}

main();
