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
import { decodeText, readNumberAt } from './text';

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
  const n = text.length;
  let i = 0;
  let line = 1;

  // Words are scanned in place. A backslash before a line end joins the lines; '#' starts a comment.
  const atLineEnd = (): boolean => {
    for (;;) {
      if (i >= n) return true;
      const c = text.charCodeAt(i);
      if (c === 10) return true;
      if (c === 92 /* \ */ && (text.charCodeAt(i + 1) === 10 || (text.charCodeAt(i + 1) === 13 && text.charCodeAt(i + 2) === 10))) {
        i += text.charCodeAt(i + 1) === 10 ? 2 : 3;
        line++;
        continue;
      }
      if (c === 35 /* # */) {
        const end = text.indexOf('\n', i);
        i = end < 0 ? n : end;
        return true;
      }
      if (c > 32) return false;
      i++;
    }
  };
  const word = (): string => {
    const from = i;
    while (i < n && text.charCodeAt(i) > 32) i++;
    return text.slice(from, i);
  };
  const skipLine = () => {
    const end = text.indexOf('\n', i);
    i = end < 0 ? n : end;
  };

  while (i < n) {
    if (atLineEnd()) {
      if (i < n) {
        i++;
        line++;
      }
      continue;
    }
    const keyword = word();
    if (keyword === 'v') {
      const values: number[] = [];
      while (!atLineEnd() && values.length < 4) {
        const from = i;
        const field = word();
        const value = readNumberAt(text, from, i);
        if (Number.isNaN(value) && !/^[-+]?(nan|inf|infinity)$/i.test(field)) {
          return refuse('obj-syntax', `${name}, line ${line}: "${field.slice(0, 40)}" is not a number.`);
        }
        values.push(value);
      }
      skipLine();
      if (values.length < 3) return refuse('obj-syntax', `${name}, line ${line}: a vertex needs three numbers.`);
      const w = values.length > 3 ? values[3] : 1;
      if (!values.every(Number.isFinite) || w === 0) {
        return refuse('non-finite-coordinate', `${name}, line ${line}: a coordinate is not a number or is infinite.`);
      }
      if ((vertexCount + 1) * 3 > positions.length) {
        const grown = new Float64Array(positions.length * 2);
        grown.set(positions);
        positions = grown;
      }
      const o = vertexCount * 3;
      positions[o] = (values[0] / w) * scale;
      positions[o + 1] = (values[1] / w) * scale;
      positions[o + 2] = (values[2] / w) * scale;
      vertexCount++;
    } else if (keyword === 'f' || keyword === 'fo') {
      face.length = 0;
      while (!atLineEnd()) {
        const field = word();
        const slash = field.indexOf('/');
        const token = slash >= 0 ? field.slice(0, slash) : field;
        const value = Number(token);
        if (!Number.isInteger(value) || value === 0 || token === '') {
          return refuse('obj-syntax', `${name}, line ${line}: "${field.slice(0, 40)}" is not a vertex reference.`);
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
    } else {
      // vt, vn, g, o, s, usemtl, mtllib, l, p, ...: no effect on the solid
      skipLine();
    }
  }
  if (corners === 0) return refuse('no-triangles', `${name} holds no faces.`);
  const welded = weldExact(positions.slice(0, vertexCount * 3), indices.subarray(0, corners));
  return { ok: true, parts: [{ name: baseName(options.filename), ...welded }] };
}
