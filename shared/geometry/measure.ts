/**
 * One entry point for an uploaded file: pick the reader by extension, parse,
 * measure each part, and refuse parts that enclose no volume.
 */
import { parseStl } from './stl';
import { parseObj } from './obj';
import { parse3mf, DEFAULT_MAX_3MF_BYTES, DEFAULT_MAX_TRIANGLES } from './threemf';
import { measureMesh, meshWarnings, type MeshMetrics, type MeshWarning, type WarningOptions } from './metrics';
import { MM_PER_UNIT, quoteName, refuse, type LengthUnit, type ParseResult, type ParsedPart, type Problem } from './types';
import { dropEmptyFacets } from './weld';

export type MeshFormat = 'stl' | 'obj' | '3mf';

export const SUPPORTED_EXTENSIONS: readonly string[] = ['.stl', '.obj', '.3mf'];

export interface MeasureOptions extends WarningOptions {
  filename: string;
  /** Unit of STL and OBJ coordinates (they carry none); a 3MF's own unit wins. */
  unit?: LengthUnit;
  /** A 3MF with several build items: one part each (true, the default) or one merged part. */
  splitObjects?: boolean;
  maxUncompressedBytes?: number;
  /** Cap on a file's triangles (after a 3MF's components are expanded). */
  maxTriangles?: number;
  /** Cap on the inflated-to-compressed ratio of one 3MF (ZIP) entry. */
  maxCompressionRatio?: number;
}

export interface MeasuredPart {
  name: string;
  metrics: MeshMetrics;
  warnings: MeshWarning[];
}

export type MeasureResult =
  | { ok: true; format: MeshFormat; parts: MeasuredPart[] }
  | { ok: false; problems: Problem[] };

export function formatFromFilename(filename: string): MeshFormat | null {
  const lower = filename.toLowerCase();
  if (lower.endsWith('.stl')) return 'stl';
  if (lower.endsWith('.obj')) return 'obj';
  if (lower.endsWith('.3mf')) return '3mf';
  return null;
}

/** Parses a file into parts in mm, choosing the reader by the file's extension. */
export function parseMeshFile(bytes: Uint8Array, options: MeasureOptions): ParseResult & { format?: MeshFormat } {
  const format = formatFromFilename(options.filename);
  if (!format) {
    return refuse(
      'unsupported-extension',
      `${quoteName(options.filename)} is not a supported mesh file: upload STL (.stl), OBJ (.obj) or 3MF (.3mf).`,
    );
  }
  if (options.unit !== undefined && !(options.unit in MM_PER_UNIT)) {
    // The caller's form field, not the file, is wrong: the route validates it before measuring.
    throw new RangeError(`unit must be one of ${Object.keys(MM_PER_UNIT).join(', ')}`);
  }
  if (bytes.length === 0) return refuse('empty-file', `${quoteName(options.filename)} is empty (0 bytes).`);
  const maxTriangles = options.maxTriangles ?? DEFAULT_MAX_TRIANGLES;
  const result =
    format === 'stl'
      ? parseStl(bytes, options)
      : format === 'obj'
        ? parseObj(bytes, options)
        : parse3mf(bytes, { ...options, maxTriangles, maxUncompressedBytes: options.maxUncompressedBytes ?? DEFAULT_MAX_3MF_BYTES });
  if (result.ok && format !== '3mf') {
    // An STL or OBJ cannot expand past its own size, so the count is checked once read.
    const triangles = result.parts.reduce((s, p) => s + p.indices.length / 3, 0);
    if (triangles > maxTriangles) {
      return {
        ...refuse('too-many-triangles', `${quoteName(options.filename)} is refused: it holds ${triangles.toLocaleString('en-US')} triangles, past the limit of ${maxTriangles.toLocaleString('en-US')} triangles per file.`),
        format,
      };
    }
  }
  if (!result.ok) return { ...result, format };
  // Facets without area or written twice are left out here, so that every reader of a file (the upload's
  // measurement, slicing, packing, the server's re-check) sees the same solid.
  const parts: ParsedPart[] = [];
  for (const part of result.parts) {
    const { indices, collapsed, repeated } = dropEmptyFacets(part.indices);
    if (indices.length === 0) {
      const label = `${quoteName(options.filename)}${result.parts.length > 1 ? `, part "${part.name}"` : ''}`;
      return { ...refuse('no-triangles', `${label} holds no triangles with area: every facet has two corners at one point.`), format };
    }
    parts.push(indices === part.indices ? part : { ...part, indices, emptyFacets: { collapsed, repeated } });
  }
  return { ok: true, parts, format };
}

/**
 * Measures every part of a file. A part whose volume is zero (a flat or empty
 * surface) cannot be printed, so the file is refused; watertightness and the
 * other findings are warnings.
 */
export function measureMeshFile(bytes: Uint8Array, options: MeasureOptions): MeasureResult {
  const parsed = parseMeshFile(bytes, options);
  if (!parsed.ok) return parsed;
  return measureParsedParts(parsed.parts, parsed.format!, options);
}

/** No part is larger than this along any axis (1 km): beyond it a file holds a stray coordinate, not a part. */
export const MAX_PART_SIZE_MM = 1e6;

export function measureParsedParts(parts: ParsedPart[], format: MeshFormat, options: MeasureOptions): MeasureResult {
  const measured: MeasuredPart[] = [];
  const problems: Problem[] = [];
  for (const part of parts) {
    const metrics = measureMesh(part);
    const label = `${quoteName(options.filename)}${parts.length > 1 ? `, part "${part.name}"` : ''}`;
    // Past a kilometre no unit makes it a part: a coordinate near float32's largest (3e38) read as flat before, its
    // volume lost to rounding against the size.
    if (![...metrics.sizeMm, metrics.volumeMm3, metrics.areaMm2].every(Number.isFinite) || metrics.sizeMm.some((v) => v > MAX_PART_SIZE_MM)) {
      problems.push({
        code: 'out-of-range',
        message: `${label} is so large that its size, volume or area cannot be computed (a coordinate far past any build chamber, or a wrong unit).`,
      });
      continue;
    }
    if (hasZeroVolume(metrics)) {
      problems.push({
        code: 'zero-volume',
        message: `${label} encloses no volume (it is flat or only a surface), so it cannot be printed.`,
      });
      continue;
    }
    const warnings = meshWarnings(metrics, options);
    if (part.emptyFacets) warnings.push(emptyFacetsWarning(part.emptyFacets));
    measured.push({ name: part.name, metrics, warnings });
  }
  if (problems.length > 0) return { ok: false, problems };
  return { ok: true, format, parts: measured };
}

function emptyFacetsWarning(e: { collapsed: number; repeated: number }): MeshWarning {
  const what: string[] = [];
  if (e.collapsed > 0) what.push(`${e.collapsed.toLocaleString('en-US')} facet${e.collapsed === 1 ? '' : 's'} with two corners at one point`);
  if (e.repeated > 0) what.push(`${e.repeated.toLocaleString('en-US')} facet${e.repeated === 1 ? '' : 's'} written twice`);
  return { code: 'empty-facets', message: `The file has ${what.join(' and ')}; they add nothing to the surface and were left out of the measurements, slices and packing.` };
}

/** Zero when flat in some axis, or when the enclosed volume is a vanishing share of the bounding box. */
export function hasZeroVolume(m: MeshMetrics): boolean {
  const [x, y, z] = m.sizeMm;
  const box = x * y * z;
  return box === 0 || Math.abs(m.volumeMm3) <= box * 1e-9;
}
