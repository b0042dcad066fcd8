/**
 * The area profile a packing by shape reports (shared/packing/shape/area.ts) against the geometry module's own
 * slicer (shared/geometry sliceAlong, itself checked against the sphere, cylinder and cone formulas in
 * tests/unit/geometry/slice.test.ts): the same placed meshes, sliced at the same layer middles, give the same
 * areas, also for copies of one mesh at heights a fraction of a layer apart (the triangles' spans are worked out
 * once per mesh and direction and reused), and far from the origin, where single precision rounds a triangle's
 * span by more than its distance to a layer middle.
 */
import { placementTransform, sliceAlong, type MeshData } from '@/shared/geometry';
import { areaProfile, shapeParts } from '@/shared/packing/shape';
import { box, translate } from '../../geometry/helpers';
import { cone, transformMesh, uvSphere } from '../../geometry/solids';
import { shapeInstance } from './instance';

function partsOf(meshes: MeshData[]) {
  return shapeParts(shapeInstance(meshes.map((mesh, i) => ({ id: `p${i}`, mesh, quantity: 1 })), 2, { chamber: [400, 400, 400] }));
}

test('copies in several turns at heights a fraction of a layer apart: the same areas as the geometry slicer, layer by layer', () => {
  const h = 0.1;
  const layers = 700;
  // A cone (slanted faces) and a sphere far from the origin in its own coordinates.
  const meshes = [cone(12, 30, 48), translate(uvSphere(8, 40, 20), 5000, -3000, 2500)];
  const parts = partsOf(meshes);
  const placed = [];
  const expected = new Float64Array(layers);
  let i = 0;
  for (const [index, part] of parts.entries()) {
    for (const rotation of [0, 4, 9, 17, 23]) {
      const lift = 3 + 0.0371 * i * i;
      const transform = placementTransform(rotation, part.min, part.max, [20 + 25 * (i % 10), 30 + 60 * index, lift]);
      placed.push({ part, transform });
      const s = sliceAlong(transformMesh(meshes[index], transform), { axis: 2, sign: 1 }, h / 2, h, layers);
      for (let L = 0; L < layers; L++) expected[L] += s.areaMm2[L];
      i++;
    }
  }
  // Twice: the second time from the spans kept from the first.
  for (let run = 0; run < 2; run++) {
    const got = areaProfile(placed, h, layers);
    for (let L = 0; L < layers; L++) expect(got[L]).toBeCloseTo(expected[L], 6);
  }
  expect(expected.reduce((a, b) => a + b, 0)).toBeGreaterThan(0);
});

test('far from the origin in its own coordinates, a plate thinner than a layer whose top is 0.00001 mm above a layer middle: that layer holds it', () => {
  // 10 x 20 x 0.05 mm, its corner at (5000.3, -3000.7, 2500.1): its top, 2500.15, is one that single precision holds
  // 0.0001 mm lower, so a triangle skipped by its rounded span would lose the layer.
  const [part] = partsOf([translate(box(10, 20, 0.05), 5000.3, -3000.7, 2500.1)]);
  const h = 0.1;
  for (const m of [0, 7, 123]) {
    const top = (m + 0.5) * h + 1e-5;
    // Standing, and a quarter turn about z (the same 0.05 mm up).
    for (const rotation of [0, 2]) {
      const got = areaProfile([{ part, transform: placementTransform(rotation, part.min, part.max, [40, 40, top - 0.05]) }], h, m + 10);
      // Elementary geometry: the one layer middle inside the plate cuts the 10 x 20 face, no other layer holds it.
      got.forEach((a, L) => expect(a).toBeCloseTo(L === m ? 200 : 0, 6));
    }
  }
});
