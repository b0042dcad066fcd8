/**
 * Wavefront OBJ reader (geometry only), after the Advanced Visualizer manual,
 * Appendix B1 "Object Files (.obj)":
 *
 *   v x y z [w]          a vertex; w (default 1) divides x, y, z
 *   f v1 v2 v3 ...       a face; each corner is v, v/vt, v//vn or v/vt/vn
 *
 * Indices are 1-based; a negative index counts back from the last vertex
 * defined so far (-1 is the latest). Faces with more than three corners are
 * split into a fan around their first corner. Other statements (vt, vn, g, o,
 * usemtl, ...) do not change the shape and are skipped.
 */
import { MM_PER_UNIT, quoteName, refuse, type LengthUnit, type ParseResult } from './types';
import { baseName } from './stl';
import { weldExact } from './weld';
import { decodeText } from './text';

export interface ObjOptions {
  filename: string;
  unit?: LengthUnit;
}

export function parseObj(bytes: Uint8Array, options: ObjOptions): ParseResult {
  const name = quoteName(options.filename);
  const scale = MM_PER_UNIT[options.unit ?? 'mm'];
  if (bytes.length === 0) return refuse('empty-file', `${name} is empty (0 bytes).`);
  const text = decodeText(bytes);

  let positions = new Float64Array(3 * 1024);
  let vertexCount = 0;
  let indices = new Uint32Array(3 * 1024);
  let corners = 0;
  const face: number[] = [];
  let line = 0;
  let pos = 0;
  const n = text.length;
  while (pos < n) {
    let end = text.indexOf('\n', pos);
    if (end < 0) end = n;
    line++;
    let raw = text.slice(pos, end);
    pos = end + 1;
    // A trailing backslash continues the statement on the next line.
    while (raw.endsWith('\\') && pos < n) {
      let next = text.indexOf('\n', pos);
      if (next < 0) next = n;
      raw = raw.slice(0, -1) + ' ' + text.slice(pos, next);
      pos = next + 1;
      line++;
    }
    const hash = raw.indexOf('#');
    if (hash >= 0) raw = raw.slice(0, hash);
    raw = raw.trim();
    if (raw === '') continue;
    const fields = raw.split(/\s+/);
    const keyword = fields[0];
    if (keyword === 'v') {
      if (fields.length < 4) return refuse('obj-syntax', `${name}, line ${line}: a vertex needs three numbers.`);
      const x = readNumber(fields[1]);
      const y = readNumber(fields[2]);
      const z = readNumber(fields[3]);
      const w = fields.length > 4 ? readNumber(fields[4]) : 1;
      for (const [value, text] of [[x, fields[1]], [y, fields[2]], [z, fields[3]], [w, fields[4]]] as const) {
        if (Number.isNaN(value) && !/^[-+]?(nan|inf|infinity)$/i.test(text)) {
          return refuse('obj-syntax', `${name}, line ${line}: "${text.slice(0, 40)}" is not a number.`);
        }
      }
      if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z) || !Number.isFinite(w) || w === 0) {
        return refuse('non-finite-coordinate', `${name}, line ${line}: a coordinate is not a number or is infinite.`);
      }
      if ((vertexCount + 1) * 3 > positions.length) {
        const grown = new Float64Array(positions.length * 2);
        grown.set(positions);
        positions = grown;
      }
      const o = vertexCount * 3;
      positions[o] = (x / w) * scale;
      positions[o + 1] = (y / w) * scale;
      positions[o + 2] = (z / w) * scale;
      vertexCount++;
    } else if (keyword === 'f' || keyword === 'fo') {
      face.length = 0;
      for (let k = 1; k < fields.length; k++) {
        const slash = fields[k].indexOf('/');
        const token = slash >= 0 ? fields[k].slice(0, slash) : fields[k];
        const value = Number(token);
        if (!Number.isInteger(value) || value === 0 || token === '') {
          return refuse('obj-syntax', `${name}, line ${line}: "${fields[k].slice(0, 40)}" is not a vertex reference.`);
        }
        const index = value > 0 ? value - 1 : vertexCount + value;
        if (index < 0 || index >= vertexCount) {
          return refuse(
            'obj-missing-vertex',
            `${name}, line ${line}: a face uses vertex ${value}, but only ${vertexCount} vertices are defined before it.`,
          );
        }
        face.push(index);
      }
      if (face.length < 3) return refuse('obj-syntax', `${name}, line ${line}: a face needs at least three vertices.`);
      const needed = corners + 3 * (face.length - 2);
      if (needed > indices.length) {
        const grown = new Uint32Array(Math.max(needed, indices.length * 2));
        grown.set(indices);
        indices = grown;
      }
      for (let k = 1; k + 1 < face.length; k++) {
        indices[corners++] = face[0];
        indices[corners++] = face[k];
        indices[corners++] = face[k + 1];
      }
    }
  }
  if (corners === 0) return refuse('no-triangles', `${name} holds no faces.`);
  const welded = weldExact(positions.slice(0, vertexCount * 3), indices.subarray(0, corners));
  return { ok: true, parts: [{ name: baseName(options.filename), ...welded }] };
}

/** Like Number(), but reads the words C libraries print for non-finite values ("inf", "-inf", "nan") as such. */
function readNumber(text: string): number {
  const value = Number(text);
  if (!Number.isNaN(value)) return value;
  const word = text.toLowerCase();
  if (word === 'inf' || word === '+inf' || word === 'infinity' || word === '+infinity') return Infinity;
  if (word === '-inf' || word === '-infinity') return -Infinity;
  return NaN;
}
