/**
 * Facets without area and facets written twice, as exported files often carry them: left out on reading, so a
 * closed solid reads as closed (and is packed by its shape) and its volume is not counted twice. Leaving such facets
 * out is the usual first repair of a triangle soup (common practice); the reference for each figure is the same
 * solid written without them.
 */
import { housing, measureMesh, measureMeshFile, parseMeshFile, writeAsciiStl, writeBinaryStl, type MeshData } from '../../../shared/geometry';
import { dropEmptyFacets } from '../../../shared/geometry/weld';

// A housing 60 x 40 x 25 mm: 2 mm walls, a 2 mm floor, open on top.
const clean = housing({ lengthMm: 60, widthMm: 40, heightMm: 25, wallMm: 2, floorMm: 2, cornerRadiusMm: 4, cornerSegments: 4 });
// Its volume read back from a clean binary STL (32-bit coordinates, as the files below hold).
const cleanRead = measureMeshFile(writeBinaryStl(clean), { filename: 'clean.stl' });
if (!cleanRead.ok) throw new Error(cleanRead.problems[0].message);
const cleanVolume = cleanRead.parts[0].metrics.volumeMm3;

/**
 * The housing as a careless exporter writes it: one facet with two corners a billionth of their distance from the origin
 * apart (one point once written as 32-bit floats, as STL stores them) beside an edge of the mesh, and the first facet written a second time.
 */
function withEmptyFacets(mesh: MeshData): MeshData {
  const ix = mesh.indices;
  const a = ix[3], b = ix[4];
  const near = mesh.positions.length / 3;
  const positions = Float64Array.from([...mesh.positions, ...[0, 1, 2].map((k) => mesh.positions[3 * a + k] * (1 + 1e-9))]);
  const indices = Uint32Array.from([...ix.subarray(0, 3), ...ix.subarray(0, 3), ...ix.subarray(3, 6), a, b, near, ...ix.subarray(6)]);
  return { positions, indices };
}

describe('facets that add nothing to the surface', () => {
  test('the clean housing is closed; its volume lies between the pocketed block with square and with cut corners', () => {
    const m = measureMesh(clean);
    expect(m.watertight).toBe(true);
    // Outer block less the pocket, 60 x 40 x 25 - 56 x 36 x 23; rounding the corners takes a little from the outside.
    expect(m.volumeMm3).toBeLessThan(60 * 40 * 25 - 56 * 36 * 23);
    expect(m.volumeMm3).toBeGreaterThan(60 * 40 * 25 - 56 * 36 * 23 - 4 * 4 * 4 * 25);
  });

  test('read from a binary STL, a facet with two corners at one point and a facet written twice are left out', () => {
    const bytes = writeBinaryStl(withEmptyFacets(clean));
    const parsed = parseMeshFile(bytes, { filename: 'housing.stl' });
    if (!parsed.ok) throw new Error(parsed.problems[0].message);
    expect(parsed.parts[0].indices.length).toBe(clean.indices.length);
    expect(parsed.parts[0].emptyFacets).toEqual({ collapsed: 1, repeated: 1 });

    const measured = measureMeshFile(bytes, { filename: 'housing.stl' });
    if (!measured.ok) throw new Error(measured.problems[0].message);
    const { metrics, warnings } = measured.parts[0];
    expect(metrics.watertight).toBe(true);
    expect(metrics.oriented).toBe(true);
    expect(metrics.triangles).toBe(clean.indices.length / 3);
    expect(metrics.volumeMm3).toBeCloseTo(cleanVolume, 6);
    expect(warnings.map((w) => w.code)).toEqual(['empty-facets']);
    expect(warnings[0].message).toMatch(/1 facet with two corners at one point and 1 facet written twice/);
  });

  test('kept in, the same facets make the closed solid read as open and count a facet twice', () => {
    // What the reader did before: the welded facets as they are in the file.
    const bytes = writeBinaryStl(withEmptyFacets(clean));
    const raw = parseMeshFile(bytes, { filename: 'housing.stl' });
    if (!raw.ok) throw new Error(raw.problems[0].message);
    const part = raw.parts[0];
    const welded = Uint32Array.from([...part.indices.subarray(0, 3), ...part.indices]);
    // Put back what was dropped: the first facet again and a facet (a, b, a) on an edge.
    const [a, b] = [part.indices[3], part.indices[4]];
    const kept = measureMesh({ positions: part.positions, indices: Uint32Array.from([...welded, a, b, a]) });
    expect(kept.watertight).toBe(false);
    expect(kept.nonManifoldEdges).toBeGreaterThan(0);
    expect(kept.volumeMm3).not.toBeCloseTo(cleanVolume, 3);
    // And left out again, the solid is back.
    expect(measureMesh({ positions: part.positions, indices: dropEmptyFacets(Uint32Array.from([...welded, a, b, a])).indices }).watertight).toBe(true);
  });

  test('a facet written again in the other turn is a different facet and stays (the mesh is then not closed)', () => {
    const ix = clean.indices;
    const indices = Uint32Array.from([...ix, ix[0], ix[2], ix[1]]);
    const out = dropEmptyFacets(indices);
    expect(out.collapsed + out.repeated).toBe(0);
    expect(out.indices).toBe(indices);
    expect(measureMesh({ positions: clean.positions, indices }).watertight).toBe(false);
  });

  test('a clean file comes back unchanged and without the note', () => {
    const measured = measureMeshFile(writeAsciiStl(clean), { filename: 'housing.stl' });
    if (!measured.ok) throw new Error(measured.problems[0].message);
    expect(measured.parts[0].warnings).toEqual([]);
    expect(measured.parts[0].metrics.triangles).toBe(clean.indices.length / 3);
  });

  test('a file of nothing but facets without area is refused, naming the file', () => {
    const positions = Float64Array.from([0, 0, 0, 10, 0, 0, 0, 10, 0]);
    const bytes = writeBinaryStl({ positions, indices: Uint32Array.from([0, 0, 1, 1, 2, 2]) });
    const parsed = parseMeshFile(bytes, { filename: 'dust.stl' });
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.problems[0].code).toBe('no-triangles');
    expect(parsed.problems[0].message).toMatch(/^"dust\.stl" holds no triangles with area/);
  });
});
