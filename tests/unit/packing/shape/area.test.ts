/**
 * The area profile a packing by shape reports (shared/packing/shape/area.ts) against the geometry module's own
 * slicer (shared/geometry sliceAlong, itself checked against the sphere, cylinder and cone formulas in
 * tests/unit/geometry/slice.test.ts): the same placed meshes, sliced at the same layer middles, give the same
 * areas, also for copies of one mesh at heights a fraction of a layer apart (the triangles' spans are worked out
 * once per mesh and direction and reused), and far from the origin, where single precision rounds a triangle's
 * span by more than its distance to a layer middle.
 */
import { bracket, placementTransform, sliceAlong, type MeshData } from '@/shared/geometry';
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

test('a part whose face lies on a layer middle has the same sections wherever it stands in plan; copies at one height share them', () => {
  // An L bracket (30 x 20 x 15 mm, legs 3 mm thick) turned so that a leg's 3 mm face lies at z = 10.28 mm, the
  // middle of layer 128 of 0.08 mm. That plane holds the face itself: before, the sections there came out as the
  // part's plan position times the gap the face left in the crossings (1,050 mm^2 apart for parts 140 mm apart).
  const part = partsOf([bracket({ legAMm: 30, legBMm: 20, thicknessMm: 3, widthMm: 15, gussetMm: 3 })])[0];
  const h = 0.08;
  const at = (y: number) => ({ part, transform: placementTransform(20, part.min, part.max, [40, y, 7.28]) });
  const one = areaProfile([at(10)], h, 600);
  for (const y of [60, 150]) expect(areaProfile([at(y)], h, 600)).toEqual(one);
  // Three copies in a row at the same height: three times one's sections (up to the sum's rounding).
  const three = areaProfile([at(10), at(60), at(150)], h, 600);
  three.forEach((a, k) => expect(a).toBeCloseTo(3 * one[k], 9));
  // Off the degenerate layer, the sections are the bracket's: 15 x 30 mm (a leg lying flat) or 15 x 3 plus the
  // gusset, never negative.
  expect(Math.max(...one)).toBeLessThanOrEqual(15 * 30 + 1e-9);
});
