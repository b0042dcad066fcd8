import { parseObj, measureMesh } from '../../../shared/geometry';
import { fixture } from './helpers';

const enc = (s: string) => new TextEncoder().encode(s);

function onlyPart(result: ReturnType<typeof parseObj>) {
  if (!result.ok) throw new Error(result.problems.map((p) => `${p.code}: ${p.message}`).join());
  return result.parts[0];
}

describe('OBJ', () => {
  // Wavefront Advanced Visualizer manual, Appendix B1: negative indices count back from the
  // latest vertex (-1 is the last so far); faces may use v, v/vt, v//vn, v/vt/vn; polygons allowed.
  test('a cube written with negative indices, quads and every corner form is a closed unit cube', () => {
    const part = onlyPart(parseObj(fixture('cube-negative-indices.obj'), { filename: 'cube-negative-indices.obj' }));
    const m = measureMesh(part);
    expect(m.triangles).toBe(12); // six quads, fanned
    expect(m.volumeMm3).toBeCloseTo(1, 12); // unit cube: Zhang & Chen, ICIP 2001
    expect(m.areaMm2).toBeCloseTo(6, 12);
    expect(m.watertight).toBe(true);
    expect(m.oriented).toBe(true);
  });

  test('-1 means the latest vertex defined before the face, not the last in the file (Appendix B1)', () => {
    const text = ['v 0 0 0', 'v 1 0 0', 'v 0 1 0', 'f -3 -2 -1', 'v 5 5 5', 'v 6 5 5', 'v 5 6 5', 'f -3 -2 -1'].join('\n');
    const part = onlyPart(parseObj(enc(text), { filename: 'two.obj' }));
    expect(Array.from(part.indices)).toEqual([0, 1, 2, 3, 4, 5]);
  });

  test('positive and negative references to the same vertices give the same mesh', () => {
    const head = 'v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\n';
    const positive = onlyPart(parseObj(enc(head + 'f 1 3 2\nf 1 2 4\nf 1 4 3\nf 2 3 4\n'), { filename: 'p.obj' }));
    const negative = onlyPart(parseObj(enc(head + 'f -4 -2 -3\nf -4 -3 -1\nf -4 -1 -2\nf -3 -2 -1\n'), { filename: 'n.obj' }));
    expect(Array.from(negative.indices)).toEqual(Array.from(positive.indices));
    expect(measureMesh(negative).volumeMm3).toBeCloseTo(1 / 6, 12); // Zhang & Chen, ICIP 2001
  });

  test('a vertex weight w divides the coordinates', () => {
    const part = onlyPart(parseObj(enc('v 2 0 0 2\nv 0 4 0 2\nv 0 0 6 2\nf 1 2 3\n'), { filename: 'w.obj' }));
    expect(Array.from(part.positions)).toEqual([1, 0, 0, 0, 2, 0, 0, 0, 3]);
  });

  test('a pentagon is split into three triangles around its first corner', () => {
    const part = onlyPart(parseObj(enc('v 0 0 0\nv 2 0 0\nv 3 1 0\nv 1 2 0\nv -1 1 0\nf 1 2 3 4 5\n'), { filename: 'pent.obj' }));
    expect(Array.from(part.indices)).toEqual([0, 1, 2, 0, 2, 3, 0, 3, 4]);
  });

  test('comments, groups, materials and texture lines do not change the shape', () => {
    const text = '# note\nmtllib a.mtl\no thing\ng side\nusemtl red\ns 1\nv 0 0 0 # corner\nv 1 0 0\nv 0 1 0\nvt 0 0\nvn 0 0 1\nf 1/1/1 2/1/1 3/1/1\n';
    expect(onlyPart(parseObj(enc(text), { filename: 'c.obj' })).indices.length).toBe(3);
  });

  test('the unit chosen for a unitless OBJ scales it to millimetres', () => {
    const part = onlyPart(parseObj(fixture('cube-negative-indices.obj'), { filename: 'c.obj', unit: 'cm' }));
    expect(measureMesh(part).volumeMm3).toBeCloseTo(1000, 9);
  });

  test('vertices repeated at the same position (texture seams) are merged so the mesh is closed', () => {
    // The tetrahedron with every face listing its own copies of the corners.
    const corners = [[0, 0, 0], [1, 0, 0], [0, 1, 0], [0, 0, 1]];
    const faces = [[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]];
    const lines: string[] = [];
    faces.forEach((f) => {
      for (const c of f) lines.push(`v ${corners[c].join(' ')}`);
      lines.push('f -3 -2 -1');
    });
    const m = measureMesh(onlyPart(parseObj(enc(lines.join('\n')), { filename: 'seams.obj' })));
    expect(m.vertices).toBe(4);
    expect(m.watertight).toBe(true);
  });
});
