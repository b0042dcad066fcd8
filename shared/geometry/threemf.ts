// Over 450 lines: one file format's reader and writer, following the specification section by section.
/**
 * 3MF reader (3MF Consortium, 3MF Core Specification):
 *
 * - the package is an OPC ZIP; `_rels/.rels` names the start part through a
 *   relationship of type .../3dmanufacturing/2013/01/3dmodel (§1–2, App. C);
 * - `<model unit>` is one of micron, millimeter (default), centimeter, inch,
 *   foot, meter (§3.4);
 * - a transform is "m00 m01 m02 m10 m11 m12 m20 m21 m22 m30 m31 m32" applied to
 *   row vectors, p' = [x y z 1] M (§3.3); a component's transform is applied
 *   before its parent's, so a point of a nested object lands at p C M;
 * - meshes use 0-based vertex indices (§4.1).
 *
 * What a package may expand to is capped while it is read, before the work is
 * done: the inflated bytes of the whole package, the ratio of inflated to
 * compressed bytes of each entry (both counted while inflating, see ./zip),
 * and the triangles and object instances once components are expanded
 * (counted from the object graph before any vertex is transformed). A small
 * upload can thus neither inflate into gigabytes nor multiply one triangle
 * into millions through components that reference each other.
 */
import { strFromU8 } from 'fflate';
import { quoteName, refuse, type ParseResult, type ParsedPart, type Problem } from './types';
import { baseName } from './stl';
import { readXml, type XmlName } from './xml';
import { inflateEntry, readZipDirectory, type ZipEntry } from './zip';

export const CORE_NS = 'http://schemas.microsoft.com/3dmanufacturing/core/2015/02';
export const MODEL_REL_TYPE = 'http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel';

/** Millimetres per 3MF unit (3MF Core §3.4). */
export const MM_PER_3MF_UNIT: Readonly<Record<string, number>> = {
  micron: 0.001,
  millimeter: 1,
  centimeter: 10,
  inch: 25.4,
  foot: 304.8,
  meter: 1000,
};

export type Transform12 = readonly number[];
export const IDENTITY_12: Transform12 = [1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0];

export interface ThreeMfOptions {
  filename: string;
  /** One part per build item (true) or every item merged into one part (false). */
  splitObjects?: boolean;
  /** Cap on the inflated bytes of the parts read (relationships and model). */
  maxUncompressedBytes?: number;
  /** Cap on the triangles of the whole file once components and build items are expanded. */
  maxTriangles?: number;
  /** Cap on the inflated-to-compressed ratio of one ZIP entry. */
  maxCompressionRatio?: number;
  /** Cap on the object instances the build items expand to through components. */
  maxInstances?: number;
}

export const DEFAULT_MAX_3MF_BYTES = 1024 * 1024 * 1024;
/** Triangles a file may hold after expansion: five times a 1,000,000-triangle scan, far above a printable part's need. */
export const DEFAULT_MAX_TRIANGLES = 5_000_000;
/**
 * DEFLATE cannot pass about 1032:1 (RFC 1951: 258 bytes per 2-bit code at
 * best); a model's XML of decimal coordinates compresses some 3–10:1, so 200:1
 * is reached only by padding built to inflate.
 */
export const DEFAULT_MAX_COMPRESSION_RATIO = 200;
/** Entries below this inflate harmlessly whatever their ratio. */
const RATIO_FLOOR_BYTES = 1024 * 1024;
/** Object instances after components: a plate of a few thousand copies is real; 2^16 from a doubly-referenced chain is not. */
export const DEFAULT_MAX_INSTANCES = 10_000;

/** A build item as read: the object's flattened mesh in the file's unit, and the item's transform. */
export interface ThreeMfItem {
  objectId: string;
  name: string;
  transform: number[];
}

export interface ThreeMfObject {
  id: string;
  name: string;
  positions: Float64Array;
  indices: Uint32Array;
  components: { objectId: string; transform: number[] }[];
  /** 3MF object type: model, solidsupport, support, surface or other. */
  type: string;
}

export interface ThreeMfModel {
  unit: string;
  mmPerUnit: number;
  objects: Map<string, ThreeMfObject>;
  items: ThreeMfItem[];
}

export type ThreeMfModelResult = { ok: true; model: ThreeMfModel } | { ok: false; problems: Problem[] };

/** Reads the package down to its objects and build items, without applying transforms. */
export function read3mfModel(bytes: Uint8Array, options: ThreeMfOptions): ThreeMfModelResult {
  const name = quoteName(options.filename);
  const cap = options.maxUncompressedBytes ?? DEFAULT_MAX_3MF_BYTES;
  if (bytes.length === 0) return refuse('empty-file', `${name} is empty (0 bytes).`);
  const notZip = () => refuse('3mf-not-zip', `${name} is not a 3MF package: a 3MF file is a ZIP archive, and this one could not be opened as one.`);
  if (bytes.length < 22 || bytes[0] !== 0x50 || bytes[1] !== 0x4b) return notZip();

  const entries = readZipDirectory(bytes);
  if (!entries) return notZip();
  const byLowerName = new Map<string, ZipEntry>();
  for (const e of entries) byLowerName.set(normalisePartName(e.name), e);

  const ratio = options.maxCompressionRatio ?? DEFAULT_MAX_COMPRESSION_RATIO;
  let budget = cap;
  const extract = (entry: ZipEntry): Uint8Array | Problem[] => {
    const out = inflateEntry(bytes, entry, { maxBytes: budget, maxRatio: ratio, ratioFloorBytes: RATIO_FLOOR_BYTES });
    if (out.ok) {
      budget -= out.data.length;
      return out.data;
    }
    const part = `"${entry.name.slice(0, 80)}"`;
    switch (out.reason) {
      case 'budget':
        return refuse('3mf-too-large', `${name} would expand to more than the limit of ${formatBytes(cap)} of inflated data (${part} alone reaches ${formatBytes(out.bytes)}). It may be damaged or built to overload the server.`).problems;
      case 'declared':
        return refuse('3mf-too-large', `${name} is refused: ${part} inflates to more than the ${formatBytes(entry.size)} its ZIP header declares. It is damaged or built to overload the server.`).problems;
      case 'ratio':
        return refuse('3mf-too-large', `${name} is refused: ${part} expands more than ${ratio} times its compressed size, the limit of the compression ratio per entry. It is padded or built to overload the server.`).problems;
      case 'unsupported':
        return refuse('3mf-not-zip', `${name} cannot be read: ${part} ${out.detail}.`).problems;
      default:
        return notZip().problems;
    }
  };

  let modelPath: string | null = null;
  const rels = byLowerName.get('_rels/.rels');
  if (rels) {
    const data = extract(rels);
    if (!(data instanceof Uint8Array)) return { ok: false, problems: data };
    modelPath = findStartPart(strFromU8(data));
  }
  let modelEntry = modelPath ? byLowerName.get(normalisePartName(modelPath)) : undefined;
  // Tolerate packages whose relationships are missing or point nowhere when the usual model part is present.
  if (!modelEntry) modelEntry = byLowerName.get('3d/3dmodel.model');
  if (!modelEntry) {
    return refuse(
      '3mf-no-model',
      `${name} holds no 3D model: the package ${modelPath ? `points to "${modelPath.slice(0, 80)}", which is missing` : 'names no model part'}.`,
    );
  }
  const data = extract(modelEntry);
  if (!(data instanceof Uint8Array)) return { ok: false, problems: data };
  return readModelXml(strFromU8(data), options.filename, { maxTriangles: options.maxTriangles });
}

/** Parses a 3MF package into parts in millimetres, with build item and component transforms applied. */
export function parse3mf(bytes: Uint8Array, options: ThreeMfOptions): ParseResult {
  const read = read3mfModel(bytes, options);
  if (!read.ok) return read;
  const { model } = read;
  const name = quoteName(options.filename);
  if (model.items.length === 0) return refuse('no-triangles', `${name} has no build items, so there is nothing to print.`);
  const expanded = expandedCounts(model, options);
  if (typeof expanded === 'string') return refuse('3mf-bad-model', `${name}: ${expanded}`);
  if (!expanded.ok) return refuse('too-many-triangles', `${name} is refused: ${expanded.message}`);
  const parts: ParsedPart[] = [];
  for (const item of model.items) {
    const flat = flatten(model, item.objectId, item.transform, model.mmPerUnit);
    if (typeof flat === 'string') return refuse('3mf-bad-model', `${name}: ${flat}`);
    if (!flat.positions.every(Number.isFinite)) {
      return refuse(
        'non-finite-coordinate',
        `${name}: part "${item.name.slice(0, 80)}" has coordinates too large to compute with once its unit (${model.unit}) and transforms are applied.`,
      );
    }
    parts.push({ name: item.name, ...flat });
  }
  const nonEmpty = parts.filter((p) => p.indices.length > 0);
  if (nonEmpty.length === 0) return refuse('no-triangles', `${name} holds no triangles.`);
  if (options.splitObjects ?? true) return { ok: true, parts: nonEmpty };
  return { ok: true, parts: [{ name: baseName(options.filename), ...mergeMeshes(nonEmpty) }] };
}

function findStartPart(relsXml: string): string | null {
  let target: string | null = null;
  const error = readXml(relsXml, {
    open(el, attrs) {
      if (el.local === 'Relationship' && target === null && (attrs.Type ?? '').trim() === MODEL_REL_TYPE && attrs.Target) {
        target = attrs.Target;
      }
    },
    close() {},
  });
  return error ? null : target;
}

function normalisePartName(partName: string): string {
  let n = partName.trim();
  try {
    n = decodeURIComponent(n);
  } catch {
    // keep the raw name
  }
  return n.replace(/\\/g, '/').replace(/^\/+/, '').toLowerCase();
}

function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${Math.round(n / (1024 * 1024))} MB`;
  if (n >= 1024) return `${Math.round(n / 1024)} kB`;
  return `${n} bytes`;
}

/** Reads the model XML into objects and items; exported for tests and tools that hold the XML already. */
export function readModelXml(xml: string, filename: string, caps: { maxTriangles?: number } = {}): ThreeMfModelResult {
  const name = quoteName(filename);
  const maxTriangles = caps.maxTriangles ?? DEFAULT_MAX_TRIANGLES;
  // A closed mesh has about half as many vertices as triangles (Euler: V - E + F = 2).
  const maxVertices = maxTriangles;
  let vertexCount = 0;
  let triangleCount = 0;
  const objects = new Map<string, ThreeMfObject>();
  const items: ThreeMfItem[] = [];
  let unit = 'millimeter';
  const state: { problem: Problem | null } = { problem: null };
  let foreignDepth = 0;
  let current: { id: string; name: string; type: string; pos: Grow64; idx: Grow32; components: ThreeMfObject['components'] } | null = null;
  let rootSeen = false;
  const fail = (code: Problem['code'], message: string) => {
    if (!state.problem) state.problem = { code, message: `${name}: ${message}` };
  };

  const error = readXml(xml, {
    open(el: XmlName, a) {
      if (state.problem) return;
      if (!rootSeen) {
        rootSeen = true;
        if (el.local !== 'model' || el.ns !== CORE_NS) {
          fail('3mf-bad-model', 'the model part is not a 3MF core model (its root must be <model> in the 3MF core namespace).');
          return;
        }
        unit = (a.unit ?? 'millimeter').trim();
        if (!(unit in MM_PER_3MF_UNIT)) {
          fail('3mf-unknown-unit', `the unit "${unit.slice(0, 40)}" is unknown; a 3MF unit is micron, millimeter, centimeter, inch, foot or meter.`);
        }
        return;
      }
      if (foreignDepth > 0 || el.ns !== CORE_NS) {
        foreignDepth++;
        return;
      }
      switch (el.local) {
        case 'object': {
          const type = (a.type ?? 'model').trim();
          const id = (a.id ?? '').trim();
          if (!id) return fail('3mf-bad-model', 'an object has no id.');
          if (objects.has(id)) return fail('3mf-bad-model', `two objects share the id ${id.slice(0, 20)}.`);
          current = { id, name: a.name ?? '', type, pos: new Grow64(), idx: new Grow32(), components: [] };
          return;
        }
        case 'vertex': {
          if (!current) return fail('3mf-bad-model', 'a vertex outside an object.');
          const x = Number(a.x);
          const y = Number(a.y);
          const z = Number(a.z);
          if (a.x === undefined || a.y === undefined || a.z === undefined || Number.isNaN(x) || Number.isNaN(y) || Number.isNaN(z)) {
            if ([a.x, a.y, a.z].some((s) => s !== undefined && /^\s*[-+]?(nan|inf|infinity)\s*$/i.test(s))) {
              return fail('non-finite-coordinate', `object ${current.id.slice(0, 20)} has a coordinate that is not a number.`);
            }
            return fail('3mf-bad-model', `object ${current.id.slice(0, 20)} has a vertex without three numeric coordinates.`);
          }
          if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) {
            return fail('non-finite-coordinate', `object ${current.id.slice(0, 20)} has an infinite coordinate.`);
          }
          if (++vertexCount > maxVertices) {
            return fail('too-many-triangles', `it holds more than ${maxVertices.toLocaleString('en-US')} vertices, the limit per file.`);
          }
          current.pos.push3(x, y, z);
          return;
        }
        case 'triangle': {
          if (!current) return fail('3mf-bad-model', 'a triangle outside an object.');
          const v1 = Number(a.v1);
          const v2 = Number(a.v2);
          const v3 = Number(a.v3);
          if (![v1, v2, v3].every((v) => Number.isInteger(v) && v >= 0)) {
            return fail('3mf-bad-model', `object ${current.id.slice(0, 20)} has a triangle whose vertex indices are not whole numbers.`);
          }
          if (++triangleCount > maxTriangles) {
            return fail('too-many-triangles', `it holds more than ${maxTriangles.toLocaleString('en-US')} triangles, the limit per file.`);
          }
          // A triangle that repeats a vertex has no area and no edges of its own (3MF Core §4.1 forbids it): skip it.
          if (v1 !== v2 && v2 !== v3 && v1 !== v3) current.idx.push3(v1, v2, v3);
          return;
        }
        case 'component': {
          if (!current) return fail('3mf-bad-model', 'a component outside an object.');
          const objectId = (a.objectid ?? '').trim();
          const transform = parseTransform(a.transform);
          if (!objectId) return fail('3mf-bad-model', `object ${current.id.slice(0, 20)} has a component without an objectid.`);
          if (!transform) return fail('3mf-bad-model', `object ${current.id.slice(0, 20)} has a component transform that is not 12 numbers.`);
          current.components.push({ objectId, transform });
          return;
        }
        case 'item': {
          const objectId = (a.objectid ?? '').trim();
          const transform = parseTransform(a.transform);
          if (!objectId) return fail('3mf-bad-model', 'a build item has no objectid.');
          if (!transform) return fail('3mf-bad-model', 'a build item transform is not 12 numbers.');
          items.push({ objectId, name: (a.partnumber ?? '').trim(), transform });
          return;
        }
        default:
          return;
      }
    },
    close(el: XmlName) {
      if (foreignDepth > 0) {
        foreignDepth--;
        return;
      }
      if (state.problem || el.ns !== CORE_NS) return;
      if (el.local === 'object' && current) {
        const positions = current.pos.toArray();
        const indices = current.idx.toArray();
        const vertexCount = positions.length / 3;
        for (let i = 0; i < indices.length; i++) {
          if (indices[i] >= vertexCount) {
            fail('3mf-bad-model', `object ${current.id.slice(0, 20)} has a triangle that uses vertex ${indices[i]}, but it has only ${vertexCount} vertices.`);
            break;
          }
        }
        objects.set(current.id, { id: current.id, name: current.name, type: current.type, positions, indices, components: current.components });
        current = null;
      }
    },
  });
  if (error) return refuse('3mf-bad-xml', `${name}: the 3D model is not readable XML (${error}).`);
  if (state.problem) return { ok: false, problems: [state.problem] };
  for (const item of items) {
    const object = objects.get(item.objectId);
    if (!object) return refuse('3mf-bad-model', `${name}: a build item refers to object ${item.objectId.slice(0, 20)}, which does not exist.`);
    if (!item.name) item.name = object.name || `${baseName(filename)} ${item.objectId}`;
  }
  // Supports are made for other processes; a powder bed needs none, so they are not measured.
  const visibleItems = items.filter((item) => !SUPPORT_TYPES.has(objects.get(item.objectId)!.type));
  return { ok: true, model: { unit, mmPerUnit: MM_PER_3MF_UNIT[unit], objects, items: visibleItems } };
}

function parseTransform(value: string | undefined): number[] | null {
  if (value === undefined || value.trim() === '') return IDENTITY_12.slice();
  const parts = value.trim().split(/\s+/).map(Number);
  if (parts.length !== 12 || !parts.every(Number.isFinite)) return null;
  return parts;
}

/** Row-vector product: applying a then b equals applying compose(a, b). */
export function composeTransforms(a: Transform12, b: Transform12): number[] {
  const out = new Array<number>(12);
  for (let r = 0; r < 4; r++) {
    for (let c = 0; c < 3; c++) {
      let s = r === 3 ? b[9 + c] : 0;
      for (let k = 0; k < 3; k++) s += a[r * 3 + k] * b[k * 3 + c];
      out[r * 3 + c] = s;
    }
  }
  return out;
}

/** A mirroring transform turns a mesh inside out; its triangles are reversed to keep them facing outward. */
function determinant3(m: Transform12): number {
  return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
}

const MAX_COMPONENT_DEPTH = 32;
const SUPPORT_TYPES = new Set(['support', 'solidsupport']);

/**
 * Triangles and object instances the build items expand to, counted on the
 * object graph (each object once, memoised) before any vertex is computed.
 * A string is a broken graph (a loop, a missing object).
 */
function expandedCounts(model: ThreeMfModel, options: ThreeMfOptions): { ok: true; triangles: number } | { ok: false; message: string } | string {
  const maxTriangles = options.maxTriangles ?? DEFAULT_MAX_TRIANGLES;
  const maxInstances = options.maxInstances ?? DEFAULT_MAX_INSTANCES;
  const memo = new Map<string, { triangles: number; instances: number }>();
  const visiting = new Set<string>();
  const count = (id: string, depth: number): { triangles: number; instances: number } | string => {
    const known = memo.get(id);
    if (known) return known;
    const object = model.objects.get(id);
    if (!object) return `a component refers to object ${id.slice(0, 20)}, which does not exist.`;
    if (visiting.has(id) || depth > MAX_COMPONENT_DEPTH) return `object ${id.slice(0, 20)} contains itself through its components.`;
    visiting.add(id);
    let triangles = object.indices.length / 3;
    let instances = 1;
    for (const c of object.components) {
      const sub = count(c.objectId, depth + 1);
      if (typeof sub === 'string') return sub;
      // Sums only grow; past the caps the exact figure no longer matters (and must not overflow).
      triangles = Math.min(triangles + sub.triangles, Number.MAX_SAFE_INTEGER);
      instances = Math.min(instances + sub.instances, Number.MAX_SAFE_INTEGER);
    }
    visiting.delete(id);
    const out = { triangles, instances };
    memo.set(id, out);
    return out;
  };
  let triangles = 0;
  let instances = 0;
  for (const item of model.items) {
    const c = count(item.objectId, 0);
    if (typeof c === 'string') return c;
    triangles += c.triangles;
    instances += c.instances;
  }
  if (instances > maxInstances) {
    return {
      ok: false,
      message: `its components expand to ${instances.toLocaleString('en-US')} object instances (${triangles.toLocaleString('en-US')} triangles), past the limit of ${maxInstances.toLocaleString('en-US')} instances per file.`,
    };
  }
  if (triangles > maxTriangles) {
    return {
      ok: false,
      message: `its build items and components expand to ${triangles.toLocaleString('en-US')} triangles, past the limit of ${maxTriangles.toLocaleString('en-US')} triangles per file.`,
    };
  }
  return { ok: true, triangles };
}

function flatten(model: ThreeMfModel, rootId: string, transform: Transform12, scale: number): { positions: Float64Array; indices: Uint32Array } | string {
  const pos = new Grow64();
  const idx = new Grow32();
  const visiting = new Set<string>();
  const walk = (id: string, m: Transform12, depth: number): string | null => {
    const object = model.objects.get(id);
    if (!object) return `a component refers to object ${id.slice(0, 20)}, which does not exist.`;
    if (visiting.has(id) || depth > MAX_COMPONENT_DEPTH) return `object ${id.slice(0, 20)} contains itself through its components.`;
    visiting.add(id);
    const base = pos.length / 3;
    const p = object.positions;
    for (let i = 0; i < p.length; i += 3) {
      const x = p[i];
      const y = p[i + 1];
      const z = p[i + 2];
      pos.push3(
        (x * m[0] + y * m[3] + z * m[6] + m[9]) * scale,
        (x * m[1] + y * m[4] + z * m[7] + m[10]) * scale,
        (x * m[2] + y * m[5] + z * m[8] + m[11]) * scale,
      );
    }
    const flip = determinant3(m) < 0;
    const t = object.indices;
    for (let i = 0; i < t.length; i += 3) {
      if (flip) idx.push3(base + t[i], base + t[i + 2], base + t[i + 1]);
      else idx.push3(base + t[i], base + t[i + 1], base + t[i + 2]);
    }
    for (const c of object.components) {
      const err = walk(c.objectId, composeTransforms(c.transform, m), depth + 1);
      if (err) return err;
    }
    visiting.delete(id);
    return null;
  };
  const err = walk(rootId, transform, 0);
  if (err) return err;
  return { positions: pos.toArray(), indices: idx.toArray() };
}

export function mergeMeshes(meshes: { positions: Float64Array; indices: Uint32Array }[]): { positions: Float64Array; indices: Uint32Array } {
  let vertexTotal = 0;
  let indexTotal = 0;
  for (const m of meshes) {
    vertexTotal += m.positions.length;
    indexTotal += m.indices.length;
  }
  const positions = new Float64Array(vertexTotal);
  const indices = new Uint32Array(indexTotal);
  let vo = 0;
  let io = 0;
  for (const m of meshes) {
    positions.set(m.positions, vo);
    const base = vo / 3;
    for (let i = 0; i < m.indices.length; i++) indices[io + i] = m.indices[i] + base;
    vo += m.positions.length;
    io += m.indices.length;
  }
  return { positions, indices };
}

class Grow64 {
  private data = new Float64Array(3 * 256);
  length = 0;
  push3(a: number, b: number, c: number): void {
    if (this.length + 3 > this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = a;
    this.data[this.length++] = b;
    this.data[this.length++] = c;
  }
  toArray(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

class Grow32 {
  private data = new Uint32Array(3 * 256);
  length = 0;
  push3(a: number, b: number, c: number): void {
    if (this.length + 3 > this.data.length) {
      const next = new Uint32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = a;
    this.data[this.length++] = b;
    this.data[this.length++] = c;
  }
  toArray(): Uint32Array {
    return this.data.slice(0, this.length);
  }
}
