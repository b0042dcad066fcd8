/**
 * STL reader. Layout from the StereoLithography Interface Specification
 * (1989), as reprinted in M. Burns, Automated Fabrication (1993) §6.5:
 *
 *   binary: 80-byte header | uint32 n | n x (12 float32: normal, v1, v2, v3 | uint16 attribute)
 *           50 bytes a facet, size = 84 + 50 n, little-endian
 *   ASCII:  solid name / facet normal nx ny nz / outer loop / vertex x y z (x3) /
 *           endloop / endfacet / endsolid name
 *
 * A file that begins with "solid" but whose size is exactly 84 + 50 n for its
 * own count is binary (common practice: many exporters write "solid" into the
 * binary header).
 */
import { MM_PER_UNIT, quoteName, refuse, type LengthUnit, type ParseResult } from './types';
import { VertexWelder } from './weld';
import { decodeText, readNumberAt } from './text';

export interface StlOptions {
  filename: string;
  unit?: LengthUnit;
}

export function isBinaryStlSize(byteLength: number, facetCount: number): boolean {
  return byteLength === 84 + 50 * facetCount;
}

export function parseStl(bytes: Uint8Array, options: StlOptions): ParseResult {
  const name = quoteName(options.filename);
  const scale = MM_PER_UNIT[options.unit ?? 'mm'];
  if (bytes.length === 0) return refuse('empty-file', `${name} is empty (0 bytes).`);
  if (bytes.length >= 84) {
    const count = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength).getUint32(80, true);
    if (isBinaryStlSize(bytes.length, count)) return parseBinary(bytes, count, options.filename, scale);
  }
  if (looksLikeAsciiStl(bytes)) return parseAscii(bytes, options.filename, scale);
  if (bytes.length < 84) {
    return refuse('stl-truncated', `${name} is too short to be an STL file: ${bytes.length} bytes, a binary STL needs at least 84.`);
  }
  const count = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength).getUint32(80, true);
  if ((bytes.length - 84) % 50 !== 0) {
    return refuse(
      'stl-size-not-facets',
      `${name} is not a whole number of facets: a binary STL is 84 bytes plus 50 bytes per triangle, but this file has ${bytes.length} bytes. It may be truncated or damaged.`,
    );
  }
  const sizeCount = (bytes.length - 84) / 50;
  return refuse(
    'stl-facet-count-mismatch',
    `${name} says it holds ${count} triangles, but its size fits ${sizeCount}. The file is probably truncated or damaged.`,
  );
}

function looksLikeAsciiStl(bytes: Uint8Array): boolean {
  let i = 0;
  while (i < bytes.length && (bytes[i] === 0x20 || bytes[i] === 0x09 || bytes[i] === 0x0a || bytes[i] === 0x0d)) i++;
  const word = String.fromCharCode(...bytes.subarray(i, i + 5)).toLowerCase();
  if (word !== 'solid') return false;
  const end = Math.min(bytes.length, 1024);
  for (let j = i; j < end; j++) if (bytes[j] === 0) return false;
  return true;
}

function parseBinary(bytes: Uint8Array, count: number, filename: string, scale: number): ParseResult {
  if (count === 0) return refuse('no-triangles', `${quoteName(filename)} holds no triangles.`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  // A closed mesh has about half as many vertices as triangles.
  const welder = new VertexWelder(Math.ceil(count * 0.6) + 16);
  const indices = new Uint32Array(count * 3);
  for (let t = 0; t < count; t++) {
    const base = 84 + t * 50 + 12;
    for (let k = 0; k < 3; k++) {
      const o = base + k * 12;
      const bx = view.getUint32(o, true);
      const by = view.getUint32(o + 4, true);
      const bz = view.getUint32(o + 8, true);
      // Exponent all ones: NaN or infinity.
      if ((bx & 0x7f800000) === 0x7f800000 || (by & 0x7f800000) === 0x7f800000 || (bz & 0x7f800000) === 0x7f800000) {
        return refuse(
          'non-finite-coordinate',
          `${quoteName(filename)} has a coordinate that is not a number or is infinite (triangle ${t + 1}).`,
        );
      }
      indices[t * 3 + k] = welder.add(bx, by, bz);
    }
  }
  return { ok: true, parts: [{ name: baseName(filename), positions: welder.positions(scale), indices }] };
}

function parseAscii(bytes: Uint8Array, filename: string, scale: number): ParseResult {
  const name = quoteName(filename);
  const text = decodeText(bytes);
  const welder = new VertexWelder(1024);
  const f32 = new Float32Array(3);
  const u32 = new Uint32Array(f32.buffer);
  let indices = new Uint32Array(3 * 1024);
  let corners = 0;
  let inLoop = false;
  let loopCorners = 0;
  let line = 1;
  let i = 0;
  const n = text.length;
  // Scans words in place: whitespace (counting lines), then a keyword and its arguments.
  const skipToLineEnd = () => {
    const end = text.indexOf('\n', i);
    i = end < 0 ? n : end;
  };
  const nextWord = (): string | null => {
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 10) {
        if (wordsOnLine) return null;
        line++;
      } else if (c > 32) break;
      i++;
    }
    if (i >= n) return null;
    wordStart = i;
    while (i < n && text.charCodeAt(i) > 32) i++;
    return text.slice(wordStart, i);
  };
  let wordStart = 0;
  // Vertex arguments must stay on their line; keywords may follow any whitespace.
  let wordsOnLine = false;
  for (;;) {
    wordsOnLine = false;
    const word = nextWord();
    if (word === null) break;
    const keyword = word.toLowerCase();
    if (keyword === 'vertex') {
      if (!inLoop) return refuse('stl-ascii-syntax', `${name}, line ${line}: a vertex outside an "outer loop".`);
      wordsOnLine = true;
      for (let k = 0; k < 3; k++) {
        const field = nextWord();
        if (field === null) return refuse('stl-ascii-syntax', `${name}, line ${line}: a vertex needs three numbers.`);
        const value = readNumberAt(text, wordStart, i);
        if (Number.isNaN(value) && !/^[-+]?(nan|inf|infinity)$/i.test(field)) {
          return refuse('stl-ascii-syntax', `${name}, line ${line}: "${field.slice(0, 40)}" is not a number.`);
        }
        if (!Number.isFinite(value)) {
          return refuse('non-finite-coordinate', `${name}, line ${line}: a coordinate is not a number or is infinite.`);
        }
        f32[k] = value;
      }
      if (loopCorners >= 3) return refuse('stl-ascii-syntax', `${name}, line ${line}: a facet with more than three vertices.`);
      if (corners + 1 > indices.length) {
        const grown = new Uint32Array(indices.length * 2);
        grown.set(indices);
        indices = grown;
      }
      indices[corners++] = welder.add(u32[0], u32[1], u32[2]);
      loopCorners++;
    } else if (keyword === 'outer') {
      inLoop = true;
      loopCorners = 0;
      skipToLineEnd();
    } else if (keyword === 'endloop') {
      if (loopCorners !== 3) {
        return refuse('stl-ascii-syntax', `${name}, line ${line}: a facet has ${loopCorners} vertices instead of three.`);
      }
      inLoop = false;
    } else if (keyword === 'solid' || keyword === 'facet' || keyword === 'endsolid') {
      // a name or the facet normal follows: not needed, the normal comes from the corner order
      skipToLineEnd();
    } else if (keyword !== 'endfacet') {
      return refuse('stl-ascii-syntax', `${name}, line ${line}: unexpected "${word.slice(0, 40)}".`);
    }
  }
  if (inLoop) return refuse('stl-ascii-syntax', `${name} ends inside a facet: the file may be truncated.`);
  if (corners === 0) return refuse('no-triangles', `${name} holds no triangles.`);
  return {
    ok: true,
    parts: [{ name: baseName(filename), positions: welder.positions(scale), indices: indices.slice(0, corners) }],
  };
}

/** File name without folders and extension, used as the part's name. */
export function baseName(filename: string): string {
  const last = filename.split(/[\\/]/).pop() ?? filename;
  const dot = last.lastIndexOf('.');
  return (dot > 0 ? last.slice(0, dot) : last) || 'part';
}
