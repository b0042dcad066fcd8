/**
 * Plain data shared by the parsers, the metrics and the writers. Lengths are in
 * millimetres once a parser has applied the file's unit.
 */

/** A triangle mesh: xyz triples and 0-based vertex indices, three per triangle. */
export interface MeshData {
  positions: Float64Array;
  indices: Uint32Array;
}

/** One measurable part found in a file (a 3MF may hold several). */
export interface ParsedPart extends MeshData {
  name: string;
  /** Facets the reader left out (see dropEmptyFacets), when there were any. */
  emptyFacets?: { collapsed: number; repeated: number };
}

/** Units a user may pick for formats that carry none (STL, OBJ). */
export type LengthUnit = 'mm' | 'cm' | 'inch';

export const MM_PER_UNIT: Readonly<Record<LengthUnit, number>> = { mm: 1, cm: 10, inch: 25.4 };

/**
 * Why a file was refused. Every code has a message that names the file and
 * says what is wrong in words a designer understands.
 */
export type ProblemCode =
  | 'empty-file'
  | 'unsupported-extension'
  | 'stl-truncated'
  | 'stl-size-not-facets'
  | 'stl-facet-count-mismatch'
  | 'stl-ascii-syntax'
  | 'non-finite-coordinate'
  | 'obj-syntax'
  | 'obj-missing-vertex'
  | 'no-triangles'
  | '3mf-not-zip'
  | '3mf-no-model'
  | '3mf-unknown-unit'
  | '3mf-too-large'
  | '3mf-bad-xml'
  | '3mf-bad-model'
  | 'too-many-triangles'
  | 'out-of-range'
  | 'zero-volume';

export interface Problem {
  code: ProblemCode;
  message: string;
}

export type ParseResult = { ok: true; parts: ParsedPart[] } | { ok: false; problems: Problem[] };

export function refuse(code: ProblemCode, message: string): { ok: false; problems: Problem[] } {
  return { ok: false, problems: [{ code, message }] };
}

/** Quotes a file name for a message, keeping control characters out of it. */
export function quoteName(filename: string): string {
  const clean = filename.replace(/[\u0000-\u001f\u007f]/g, '').slice(0, 200);
  return `"${clean || 'unnamed file'}"`;
}
