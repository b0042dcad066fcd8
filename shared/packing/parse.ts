import { rotationsAllowed, rotationIndex } from '../geometry/rotations';
import { isOrientation } from './geometry';
import {
  FITS,
  INSTANCE_FORMAT,
  INSTANCE_FORMAT_V2,
  type Fit,
  type PackInstanceV2,
  type PackPartV2,
  type PartMesh,
  OBJECTIVES,
  ORIENTATIONS,
  type FieldProblem,
  type Objective,
  type Orientation,
  type PackInstance,
  type PackPart,
  type Vec3,
} from './types';

/** Above this many boxes in total an instance is refused: the layout alone would not fit in memory comfortably. */
export const MAX_TOTAL_QUANTITY = 200_000;
/**
 * Above this many layers in the chamber's height an instance is refused: a layout by shape carries one number a
 * layer (`areaProfile`), and 10^7 of them took 450 MB. Machines print layers of 0.01 mm or more: 100,000 of
 * those are a metre.
 */
export const MAX_LAYERS = 100_000;

export type ParseResult = { ok: true; instance: PackInstance } | { ok: false; problems: FieldProblem[] };

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

/**
 * Checks an instance from outside (command line, HTTP body, worker message),
 * applies the defaults and reports every problem with the field it concerns.
 */
export function parseInstance(input: unknown): ParseResult {
  const problems: FieldProblem[] = [];
  const bad = (field: string, message: string) => problems.push({ field, message });

  if (!isObject(input)) {
    return { ok: false, problems: [{ field: 'instance', message: 'must be a JSON object' }] };
  }

  if (input.format !== INSTANCE_FORMAT) bad('format', `must be "${INSTANCE_FORMAT}"`);

  const chamber = readVec3(input.chamber, 'chamber', bad);

  let margin = { xy: 0, bottom: 0, top: 0 };
  if (input.margin !== undefined) {
    if (!isObject(input.margin)) bad('margin', 'must be an object with xy, bottom and top');
    else {
      for (const key of ['xy', 'bottom', 'top'] as const) {
        const v = input.margin[key];
        if (v === undefined) continue;
        if (!isFiniteNumber(v) || v < 0) bad(`margin.${key}`, 'must be a number >= 0');
        else margin = { ...margin, [key]: v };
      }
    }
  }

  const spacing = readOptionalNumber(input.spacing, 'spacing', 0, (v) => v >= 0, 'must be a number >= 0', bad);
  const layerHeight = readOptionalNumber(input.layerHeight, 'layerHeight', 0.1, (v) => v > 0, 'must be a positive number', bad);
  const timeLimitMs = readOptionalNumber(input.timeLimitMs, 'timeLimitMs', 2000, (v) => v >= 0, 'must be a number >= 0', bad);
  const seed = readOptionalNumber(input.seed, 'seed', 1, (v) => Number.isInteger(v), 'must be an integer', bad);

  let objective: Objective = 'min-height';
  if (input.objective !== undefined) {
    if (typeof input.objective === 'string' && (OBJECTIVES as readonly string[]).includes(input.objective)) {
      objective = input.objective as Objective;
    } else bad('objective', `must be one of ${OBJECTIVES.map((o) => `"${o}"`).join(', ')}`);
  }

  if (chamber) {
    if (2 * margin.xy >= chamber[0] || 2 * margin.xy >= chamber[1]) {
      bad('margin.xy', 'must leave a usable width: twice it must be less than chamber[0] and chamber[1]');
    }
    if (chamber[2] / layerHeight > MAX_LAYERS) {
      bad('layerHeight', `must leave at most ${MAX_LAYERS} layers in the chamber's ${chamber[2]} mm (a layer of ${chamber[2] / MAX_LAYERS} mm or more), not ${layerHeight}`);
    }
    if (margin.bottom + margin.top >= chamber[2]) {
      bad('margin.top', 'must leave a usable height: margin.bottom + margin.top must be less than chamber[2]');
    }
  }

  const parts: PackPart[] = [];
  if (!Array.isArray(input.parts)) bad('parts', 'must be an array (possibly empty)');
  else {
    const seen = new Map<string, number>();
    let total = 0;
    input.parts.forEach((raw, i) => {
      const at = `parts[${i}]`;
      if (!isObject(raw)) {
        bad(at, 'must be an object with id, size and quantity');
        return;
      }
      let id: string | undefined;
      if (typeof raw.id !== 'string' || raw.id.length === 0) bad(`${at}.id`, 'must be a non-empty string');
      else if (seen.has(raw.id)) bad(`${at}.id`, `must be unique: "${raw.id}" is also parts[${seen.get(raw.id)}].id`);
      else {
        id = raw.id;
        seen.set(raw.id, i);
      }
      const size = readVec3(raw.size, `${at}.size`, bad);
      let quantity: number | undefined;
      if (!isFiniteNumber(raw.quantity) || !Number.isInteger(raw.quantity) || raw.quantity < 0) {
        bad(`${at}.quantity`, 'must be an integer >= 0');
      } else quantity = raw.quantity;
      let orientations: Orientation[] = [...ORIENTATIONS];
      let orientationsOk = true;
      if (raw.orientations !== undefined) {
        if (!Array.isArray(raw.orientations) || raw.orientations.length === 0) {
          bad(`${at}.orientations`, `must be a non-empty array of ${ORIENTATIONS.join(', ')}`);
          orientationsOk = false;
        } else {
          const list: Orientation[] = [];
          raw.orientations.forEach((o, k) => {
            if (!isOrientation(o)) {
              bad(`${at}.orientations[${k}]`, `must be one of ${ORIENTATIONS.join(', ')}`);
              orientationsOk = false;
            } else if (!list.includes(o)) list.push(o);
          });
          orientations = list;
        }
      }
      if (quantity !== undefined) total += quantity;
      if (id !== undefined && size && quantity !== undefined && orientationsOk) {
        parts.push({ id, size, quantity, orientations });
      }
    });
    if (total > MAX_TOTAL_QUANTITY) bad('parts', `must hold at most ${MAX_TOTAL_QUANTITY} boxes in total (sum of quantity is ${total})`);
  }

  if (problems.length > 0 || !chamber) return { ok: false, problems };
  return {
    ok: true,
    instance: { format: INSTANCE_FORMAT, chamber, margin, spacing, layerHeight, objective, timeLimitMs, seed, parts },
  };
}

function readVec3(v: unknown, field: string, bad: (f: string, m: string) => void): Vec3 | undefined {
  if (!Array.isArray(v) || v.length !== 3) {
    bad(field, 'must be an array of 3 positive numbers');
    return undefined;
  }
  let ok = true;
  v.forEach((c, k) => {
    if (!isFiniteNumber(c) || c <= 0) {
      bad(`${field}[${k}]`, 'must be a positive number');
      ok = false;
    }
  });
  return ok ? [v[0], v[1], v[2]] : undefined;
}

function readOptionalNumber(
  v: unknown,
  field: string,
  fallback: number,
  accept: (n: number) => boolean,
  message: string,
  bad: (f: string, m: string) => void,
): number {
  if (v === undefined) return fallback;
  if (!isFiniteNumber(v) || !accept(v)) {
    bad(field, message);
    return fallback;
  }
  return v;
}

export type ParseResultV2 = { ok: true; instance: PackInstanceV2 } | { ok: false; problems: FieldProblem[] };

/** Every quarter-turn rotation, the default of a mesh part. */
const ALL_ROTATIONS = Array.from({ length: 24 }, (_, k) => k);
/** The six box orientations, the default of a part given by its size only. */
const BOX_ROTATIONS = [0, 1, 2, 3, 4, 5];

/**
 * Checks a "pack-instance/2" object: version 1's fields, plus `fit`, a `mesh`
 * per part (a file path, or the mesh itself as { positions, indices } when
 * sent to a worker) and the 24 signed rotation codes or "upright". A mesh
 * part may leave `size` out; its mesh is loaded by the caller
 * (see `attachMesh`), since reading files is not this module's business.
 */
export function parseInstanceV2(input: unknown): ParseResultV2 {
  if (!isObject(input)) return { ok: false, problems: [{ field: 'instance', message: 'must be a JSON object' }] };
  if (input.format !== INSTANCE_FORMAT_V2) return { ok: false, problems: [{ field: 'format', message: `must be "${INSTANCE_FORMAT_V2}"` }] };
  // The shared fields go through the version 1 reader with the parts held back.
  const common = parseInstance({ ...input, format: INSTANCE_FORMAT, parts: [] });
  const problems: FieldProblem[] = common.ok ? [] : [...common.problems];
  const bad = (field: string, message: string) => problems.push({ field, message });

  let fit: Fit = 'box';
  if (input.fit !== undefined) {
    if (typeof input.fit === 'string' && (FITS as readonly string[]).includes(input.fit)) fit = input.fit as Fit;
    else bad('fit', `must be one of ${FITS.map((f) => `"${f}"`).join(', ')}`);
  }

  const parts: PackPartV2[] = [];
  if (!Array.isArray(input.parts)) bad('parts', 'must be an array (possibly empty)');
  else {
    const seen = new Map<string, number>();
    let total = 0;
    input.parts.forEach((raw, i) => {
      const at = `parts[${i}]`;
      if (!isObject(raw)) {
        bad(at, 'must be an object with id, quantity and a size or a mesh');
        return;
      }
      let ok = true;
      let id = '';
      if (typeof raw.id !== 'string' || raw.id.length === 0) {
        bad(`${at}.id`, 'must be a non-empty string');
        ok = false;
      } else if (seen.has(raw.id)) {
        bad(`${at}.id`, `must be unique: "${raw.id}" is also parts[${seen.get(raw.id)}].id`);
        ok = false;
      } else {
        id = raw.id;
        seen.set(raw.id, i);
      }
      let meshPath: string | null = null;
      let mesh: PartMesh | null = null;
      if (raw.mesh !== undefined) {
        if (typeof raw.mesh === 'string') {
          if (raw.mesh.trim().length === 0) {
            bad(`${at}.mesh`, 'must be a non-empty file path');
            ok = false;
          } else meshPath = raw.mesh;
        } else {
          const m = readInlineMesh(raw.mesh);
          if (typeof m === 'string') {
            bad(`${at}.mesh`, m);
            ok = false;
          } else mesh = m;
        }
      }
      const hasMesh = meshPath !== null || mesh !== null;
      let size: Vec3 | null = null;
      if (raw.size !== undefined || !hasMesh) {
        const v = readVec3(raw.size, `${at}.size`, bad);
        if (!v) ok = false;
        else size = v;
      }
      let quantity = 0;
      if (!isFiniteNumber(raw.quantity) || !Number.isInteger(raw.quantity) || raw.quantity < 0) {
        bad(`${at}.quantity`, 'must be an integer >= 0');
        ok = false;
      } else quantity = raw.quantity;
      let rotations = hasMesh ? ALL_ROTATIONS : BOX_ROTATIONS;
      if (raw.orientations !== undefined) {
        const list = raw.orientations;
        if (!Array.isArray(list) || list.length === 0) {
          bad(`${at}.orientations`, 'must be a non-empty array of rotation codes (such as "xyz" or "-y+x+z") or "upright"');
          ok = false;
        } else {
          list.forEach((o, k) => {
            if (typeof o !== 'string' || (o !== 'upright' && rotationIndex(o) < 0)) {
              bad(`${at}.orientations[${k}]`, 'must be a rotation code such as "xyz" or "-y+x+z", or "upright"');
              ok = false;
            }
          });
          if (ok) rotations = rotationsAllowed(list as string[]) ?? rotations;
        }
      }
      total += quantity;
      if (ok) parts.push({ id, size, quantity, rotations: [...rotations], meshPath, mesh });
    });
    if (total > MAX_TOTAL_QUANTITY) bad('parts', `must hold at most ${MAX_TOTAL_QUANTITY} parts in total (sum of quantity is ${total})`);
  }
  if (problems.length > 0 || !common.ok) return { ok: false, problems };
  const c = common.instance;
  return {
    ok: true,
    instance: {
      format: INSTANCE_FORMAT_V2,
      chamber: c.chamber,
      margin: c.margin,
      spacing: c.spacing,
      layerHeight: c.layerHeight,
      objective: c.objective,
      timeLimitMs: c.timeLimitMs,
      seed: c.seed,
      fit,
      parts,
    },
  };
}

/** A mesh sent inline: { positions: 3n finite numbers, indices: 3m vertex numbers below n }. */
function readInlineMesh(v: unknown): PartMesh | string {
  if (!isObject(v)) return 'must be a file path, or a mesh { positions, indices }';
  const isNumbers = (a: unknown): a is ArrayLike<number> =>
    Array.isArray(a) || Object.prototype.toString.call(a) === '[object Float64Array]' || Object.prototype.toString.call(a) === '[object Float32Array]' || Object.prototype.toString.call(a) === '[object Uint32Array]';
  if (!isNumbers(v.positions) || v.positions.length % 3 !== 0) return 'positions must be 3 numbers a vertex';
  if (!isNumbers(v.indices) || v.indices.length % 3 !== 0 || v.indices.length === 0) return 'indices must be 3 vertex numbers a triangle';
  const positions = Float64Array.from(v.positions);
  for (let i = 0; i < positions.length; i++) if (!Number.isFinite(positions[i])) return `positions[${i}] must be a finite number`;
  const n = positions.length / 3;
  const raw = v.indices;
  const indices = new Uint32Array(raw.length);
  for (let i = 0; i < raw.length; i++) {
    const k = raw[i];
    if (!Number.isInteger(k) || k < 0 || k >= n) return `indices[${i}] must be a vertex number below ${n}`;
    indices[i] = k;
  }
  return { positions, indices };
}

/** Reads either version; the caller looks at `format` to tell them apart. */
export function parseAnyInstance(input: unknown): ParseResult | ParseResultV2 {
  if (isObject(input) && input.format === INSTANCE_FORMAT_V2) return parseInstanceV2(input);
  return parseInstance(input);
}
