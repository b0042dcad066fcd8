/**
 * The benchmark's concave mixes, finely tessellated (`fine`): the same parts and copies, closed meshes of many more
 * triangles, truer to the curved solids they stand for. The rings are tori, whose volume is 2 pi^2 R r^2 (Pappus's
 * centroid theorem); a torus of n x m flat facets with its corners on it falls short of that, by no more than
 * (2 pi^2 / 3)(1/n^2 + 1/m^2) of it (to first order, what an n-gon and an m-gon inscribed in their circles lose:
 * (n / 2 pi) sin(2 pi / n) = 1 - 2 pi^2 / 3n^2 + ...).
 */
import { measureMesh } from '@/shared/geometry';
import { generateShapeMix } from '@/shared/packing';

describe('finely tessellated concave mixes', () => {
  const coarse = generateShapeMix({ parts: 300, seed: 2 });
  const fine = generateShapeMix({ parts: 300, seed: 2, fine: true });

  test('the same parts and copies, each mesh closed, the curved ones of many more triangles', () => {
    expect(fine.parts.map((p) => [p.id, p.quantity])).toEqual(coarse.parts.map((p) => [p.id, p.quantity]));
    for (const [i, p] of fine.parts.entries()) {
      const m = measureMesh(p.mesh!);
      expect(m.watertight && m.oriented).toBe(true);
      const triangles = p.mesh!.indices.length / 3;
      const before = coarse.parts[i].mesh!.indices.length / 3;
      if (/^(ring|clip|housing)-/.test(p.id)) expect(triangles).toBeGreaterThan(10 * before);
      else expect(triangles).toBe(before);
      // The same part: its box within the coarse facets' shortfall.
      for (let a = 0; a < 3; a++) expect(Math.abs(p.size![a] - coarse.parts[i].size![a])).toBeLessThan(0.05 * coarse.parts[i].size![a] + 0.01);
    }
  });

  test("a fine ring's volume falls short of the torus's by no more than its facets lose, the coarse one's by far more", () => {
    const rings = fine.parts.filter((p) => p.id.startsWith('ring-'));
    expect(rings.length).toBeGreaterThan(0);
    for (const ring of rings) {
      // Major radius R: halfway between the hole and the outside; minor radius r: half the thickness.
      const [x, , z] = ring.size!;
      const r = z / 2;
      const R = x / 2 - r;
      const torus = 2 * Math.PI ** 2 * R * r * r;
      const most = ((2 * Math.PI ** 2) / 3) * (1 / 384 ** 2 + 1 / 48 ** 2);
      const short = 1 - measureMesh(ring.mesh!).volumeMm3 / torus;
      expect(short).toBeGreaterThan(0);
      expect(short).toBeLessThanOrEqual(most);
      // The coarse ring (32 x 12 facets) falls short by ten times as much or more.
      const coarseRing = coarse.parts.find((p) => p.id === ring.id)!;
      expect(1 - measureMesh(coarseRing.mesh!).volumeMm3 / torus).toBeGreaterThan(10 * short);
    }
  });
});
