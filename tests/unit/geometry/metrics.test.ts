import fc from 'fast-check';
import { measureMesh, meshWarnings, mergeMeshes, type MeshData } from '../../../shared/geometry';
import { box, flipAll, tetrahedron, translate } from './helpers';

describe('volume and area', () => {
  test('the tetrahedron (0,0,0),(1,0,0),(0,1,0),(0,0,1) has volume 1/6 and area 1.5 + sqrt(3)/2', () => {
    const m = measureMesh(tetrahedron());
    expect(m.volumeMm3).toBeCloseTo(1 / 6, 14); // Zhang & Chen, ICIP 2001
    expect(m.areaMm2).toBeCloseTo(1.5 + Math.sqrt(3) / 2, 14); // elementary: three right triangles and one equilateral of side sqrt 2
  });

  test('the unit cube has volume 1 and area 6', () => {
    const m = measureMesh(box());
    expect(m.volumeMm3).toBeCloseTo(1, 14); // Zhang & Chen, ICIP 2001
    expect(m.areaMm2).toBeCloseTo(6, 14);
    expect(m.sizeMm).toEqual([1, 1, 1]);
  });

  test('flipping every triangle negates the volume and keeps the area (Zhang & Chen, ICIP 2001)', () => {
    const m = measureMesh(flipAll(box(2, 3, 4)));
    expect(m.volumeMm3).toBeCloseTo(-24, 12);
    expect(m.areaMm2).toBeCloseTo(52, 12);
    expect(m.oriented).toBe(true);
    expect(meshWarnings(m).map((w) => w.code)).toContain('inside-out');
  });

  test('translation leaves volume and area unchanged, even far from the origin (Zhang & Chen, ICIP 2001)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1e5, max: 1e5, noNaN: true }),
        fc.double({ min: -1e5, max: 1e5, noNaN: true }),
        fc.double({ min: -1e5, max: 1e5, noNaN: true }),
        (dx, dy, dz) => {
          const m = measureMesh(translate(box(2, 3, 4), dx, dy, dz));
          expect(m.volumeMm3).toBeCloseTo(24, 6);
          expect(m.areaMm2).toBeCloseTo(52, 6);
        },
      ),
      { numRuns: 200 },
    );
  });

  test('the bounding box follows the vertices the triangles use', () => {
    const mesh = translate(box(2, 3, 4), 10, -5, 1);
    // an unused vertex far away does not count
    const positions = new Float64Array([...mesh.positions, 1000, 1000, 1000]);
    const m = measureMesh({ positions, indices: mesh.indices });
    expect(m.bboxMinMm).toEqual([10, -5, 1]);
    expect(m.bboxMaxMm).toEqual([12, -2, 5]);
    expect(m.vertices).toBe(8);
  });
});

describe('topology', () => {
  test('a closed box is watertight and oriented, and V - E + F = 2 (Euler)', () => {
    const m = measureMesh(box());
    expect(m.watertight).toBe(true);
    expect(m.oriented).toBe(true);
    expect([m.vertices, m.edges, m.triangles]).toEqual([8, 18, 12]);
    expect(m.eulerCharacteristic).toBe(2);
    expect(m.shells).toBe(1);
  });

  test('deleting a triangle opens three edges (3MF Core §4.1: every edge in exactly two triangles)', () => {
    const mesh = box();
    const m = measureMesh({ positions: mesh.positions, indices: mesh.indices.slice(3) });
    expect(m.openEdges).toBe(3);
    expect(m.watertight).toBe(false);
    expect(m.oriented).toBe(true);
    expect(meshWarnings(m).map((w) => w.code)).toContain('not-watertight');
  });

  test('flipping one triangle breaks orientation on its three edges but leaves the mesh closed (3MF Core §4.1)', () => {
    const indices = box().indices.slice();
    [indices[1], indices[2]] = [indices[2], indices[1]];
    const m = measureMesh({ positions: box().positions, indices });
    expect(m.watertight).toBe(true);
    expect(m.oriented).toBe(false);
    expect(m.misorientedEdges).toBe(3);
    expect(meshWarnings(m).map((w) => w.code)).toContain('inconsistent-orientation');
  });

  test('two boxes sharing an edge make that edge non-manifold', () => {
    const a = box();
    const b = translate(box(), 1, 1, 0);
    // weld b's vertex (1,1,0)->a's 2 and (1,1,1)->a's 6 so the boxes share the edge x=1,y=1
    const merged = mergeMeshes([a, b]);
    const indices = merged.indices.map((v) => (v === 8 ? 2 : v === 12 ? 6 : v));
    const m = measureMesh({ positions: merged.positions, indices });
    expect(m.nonManifoldEdges).toBe(1);
    expect(m.watertight).toBe(false);
    expect(m.oriented).toBe(true);
  });

  test('separate solids are counted as shells, and each closed genus-0 shell adds 2 to V - E + F (Euler)', () => {
    const m = measureMesh(mergeMeshes([box(), translate(box(), 5, 0, 0), translate(tetrahedron() as MeshData, 0, 5, 0)]));
    expect(m.shells).toBe(3);
    expect(m.eulerCharacteristic).toBe(6);
    expect(m.watertight).toBe(true);
  });
});

describe('warnings', () => {
  test('a part under 2 mm in every direction suggests it was drawn in another unit (common practice)', () => {
    const codes = meshWarnings(measureMesh(box(1.5, 1.2, 0.9))).map((w) => w.code);
    expect(codes).toContain('maybe-wrong-unit-small');
    expect(meshWarnings(measureMesh(box(30, 1, 1))).map((w) => w.code)).not.toContain('maybe-wrong-unit-small');
  });

  test('a part larger than the largest chamber in every orientation is flagged', () => {
    const m = measureMesh(box(400, 50, 50));
    expect(meshWarnings(m, { largestChamberMm: [340, 340, 600] }).map((w) => w.code)).toEqual([]); // fits standing up
    expect(meshWarnings(m, { largestChamberMm: [340, 340, 340] }).map((w) => w.code)).toContain('too-large-for-machines');
  });

  test('a plate thinner than the wall limit is thin; a solid block is not', () => {
    // 2 V / A of a plate approaches its thickness
    expect(meshWarnings(measureMesh(box(50, 50, 0.5))).map((w) => w.code)).toContain('thin');
    expect(meshWarnings(measureMesh(box(20, 20, 20))).map((w) => w.code)).toEqual([]);
  });
});
