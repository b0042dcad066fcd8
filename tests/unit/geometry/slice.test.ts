import { strToU8, zipSync } from 'fflate';
import {
  layoutProfiles,
  measureMesh,
  parse3mf,
  placementTransform,
  ROTATION_CODES,
  rotatedBox,
  rotationIndex,
  SliceCache,
  sliceAlong,
  sliceLoops,
  slicePart,
  slicingErrorBoundMm3,
  upAxisOfRotation,
  upRange,
  type MeshData,
} from '../../../shared/geometry';
import { box, fixture, flipAll, translate } from './helpers';
import { cone, cylinder, insideRadius, octahedron, transformMesh, uvSphere } from './solids';

const sum = (a: ArrayLike<number>) => Array.from(a).reduce((s, x) => s + x, 0);

/** The regular n-gon inscribed in a circle of radius r: area (n/2) r^2 sin(2 pi / n), perimeter 2 n r sin(pi / n) (elementary geometry). */
const ngonArea = (n: number, r: number) => (n / 2) * r * r * Math.sin((2 * Math.PI) / n);
const ngonPerimeter = (n: number, r: number) => 2 * n * r * Math.sin(Math.PI / n);

describe('a box: every section is the footprint, its contour the perimeter (elementary geometry)', () => {
  test.each(ROTATION_CODES.map((code, i) => [code, i]))('rotation %s', (_code, rotation) => {
    const size = [10, 20, 30];
    const mesh = box(size[0], size[1], size[2]);
    const p = slicePart(mesh, rotation, 0.1);
    const up = upAxisOfRotation(rotation);
    const footprint = size.filter((_, a) => a !== up.axis);
    expect(p.heightMm).toBeCloseTo(size[up.axis], 12);
    expect(p.areaMm2.length).toBe(Math.round(size[up.axis] / 0.1));
    for (let k = 0; k < p.areaMm2.length; k++) {
      expect(p.areaMm2[k]).toBeCloseTo(footprint[0] * footprint[1], 9);
      expect(p.contourMm[k]).toBeCloseTo(2 * (footprint[0] + footprint[1]), 9);
    }
    // Cavalieri: the sections times the layer height give the volume 10 x 20 x 30.
    expect(sum(p.areaMm2) * 0.1).toBeCloseTo(6000, 6);
  });

  test('a mesh turned inside out has negative sections (the signs follow the faces)', () => {
    const p = slicePart(flipAll(box(10, 20, 30)), 0, 1);
    expect(p.areaMm2[5]).toBeCloseTo(-200, 9);
    expect(p.contourMm[5]).toBeCloseTo(60, 9);
  });

  test('moving the part far from the origin changes nothing', () => {
    const near = slicePart(box(10, 20, 30), 0, 0.1);
    const far = slicePart(translate(box(10, 20, 30), 5000, -7000, 300), 0, 0.1);
    for (let k = 0; k < near.areaMm2.length; k++) expect(far.areaMm2[k]).toBeCloseTo(near.areaMm2[k], 6);
  });
});

describe('vertices and faces exactly on a plane', () => {
  test('planes through the bottom, the top and every vertex of a box: bottom face out, top face in', () => {
    // Planes z = 0, 1, ..., 30 on a 10 x 20 x 30 box: the section just below each plane counts.
    const s = sliceAlong(box(10, 20, 30), { axis: 2, sign: 1 }, 0, 1, 31);
    expect(s.areaMm2[0]).toBe(0);
    for (let k = 1; k <= 30; k++) expect(s.areaMm2[k]).toBeCloseTo(200, 9);
    expect(sum(s.areaMm2)).toBeCloseTo(6000, 6); // 30 unit slabs of 200 mm^2
  });

  test('the octahedron cut through its four equator vertices is the square of side sqrt 2', () => {
    const s = sliceAlong(octahedron(), { axis: 2, sign: 1 }, -1, 0.5, 5); // -1, -0.5, 0, 0.5, 1
    expect(s.areaMm2[0]).toBe(0); // the lower apex
    expect(s.areaMm2[2]).toBeCloseTo(2, 12); // area of the square with diagonals 2: 2 (elementary)
    expect(s.contourMm[2]).toBeCloseTo(4 * Math.SQRT2, 12);
    expect(s.areaMm2[1]).toBeCloseTo(2 * 0.25, 12); // half the size, a quarter of the area
    expect(s.areaMm2[4]).toBeCloseTo(0, 12); // the upper apex: a point
    const loops = sliceLoops(octahedron(), 0, 0);
    expect(loops).toHaveLength(1);
    expect(loops[0].closed).toBe(true);
    expect(loops[0].areaMm2).toBeCloseTo(2, 12);
  });
});

describe('sphere of radius 20: section area pi (r^2 - z^2) (spherical geometry)', () => {
  // Tessellation bound: the UV sphere is convex with its vertices on the sphere, so it lies inside the ball of
  // radius r and contains the ball of radius r_in, the smallest distance from the centre to a face's plane.
  // Its section at height z therefore lies between the discs of radius sqrt(r_in^2 - z^2) and sqrt(r^2 - z^2),
  // and its perimeter between their circumferences (a convex set inside another has the shorter perimeter).
  const r = 20;
  test.each([
    [48, 24],
    [192, 96],
  ])('%i segments x %i stacks', (segments, stacks) => {
    const mesh = uvSphere(r, segments, stacks);
    const m = measureMesh(mesh);
    expect(m.watertight && m.oriented).toBe(true);
    const rIn = insideRadius(mesh);
    const h = 0.1;
    const p = slicePart(mesh, 0, h);
    expect(p.areaMm2.length).toBe(400);
    let worst = 0;
    for (let k = 0; k < p.areaMm2.length; k++) {
      const z = -r + (k + 0.5) * h;
      const outer = Math.PI * (r * r - z * z);
      const inner = Math.PI * Math.max(0, rIn * rIn - z * z);
      expect(p.areaMm2[k]).toBeLessThanOrEqual(outer + 1e-9);
      expect(p.areaMm2[k]).toBeGreaterThanOrEqual(inner - 1e-9);
      expect(p.contourMm[k]).toBeLessThanOrEqual(2 * Math.PI * Math.sqrt(r * r - z * z) + 1e-9);
      expect(p.contourMm[k]).toBeGreaterThanOrEqual(2 * Math.PI * Math.sqrt(Math.max(0, rIn * rIn - z * z)) - 1e-9);
      worst = Math.max(worst, (outer - p.areaMm2[k]) / (Math.PI * r * r));
    }
    // The gap shrinks as the tessellation gets finer: r - r_in is about r (pi / segments)^2 / 2 + r (pi / (2 stacks))^2 / 2.
    expect(worst).toBeLessThanOrEqual(1 - (rIn / r) ** 2 + 1e-12);
    // Sections times the layer height: the volume 4/3 pi r^3 of a smooth sphere, less the tessellation's shortfall.
    const volume = sum(p.areaMm2) * h;
    expect(volume).toBeLessThanOrEqual((4 / 3) * Math.PI * r ** 3);
    expect(Math.abs(volume - m.volumeMm3)).toBeLessThanOrEqual(slicingErrorBoundMm3(mesh, { axis: 2, sign: 1 }, h));
  });

  test('every rotation of the sphere gives the same profile', () => {
    const mesh = uvSphere(r, 64, 32);
    const upright = slicePart(mesh, 0, 0.5);
    // Turned on its side the tessellation differs, so compare against the formula's bounds, not bit for bit.
    const rIn = insideRadius(mesh);
    for (const rotation of [1, 3, 6, 13]) {
      const p = slicePart(mesh, rotation, 0.5);
      expect(p.areaMm2.length).toBe(upright.areaMm2.length);
      for (let k = 0; k < p.areaMm2.length; k++) {
        const z = -r + (k + 0.5) * 0.5;
        expect(p.areaMm2[k]).toBeLessThanOrEqual(Math.PI * (r * r - z * z) + 1e-9);
        expect(p.areaMm2[k]).toBeGreaterThanOrEqual(Math.PI * Math.max(0, rIn * rIn - z * z) - 1e-9);
      }
    }
  });
});

describe('cylinder of radius 15 and height 40: section pi r^2 standing, 2 sqrt(r^2 - y^2) x height lying', () => {
  // Tessellation bound: the n-gon prism's section is the inscribed n-gon, area pi r^2 sin(2 pi/n) / (2 pi/n),
  // short of pi r^2 by at most pi r^2 (2 pi / n)^2 / 6 (Taylor bound of sin x / x >= 1 - x^2/6).
  const r = 15;
  const height = 40;
  const n = 96;
  const mesh = cylinder(r, height, n);

  test('standing: every layer is the inscribed 96-gon, within the tessellation bound of pi r^2', () => {
    for (const rotation of [0, rotationIndex('-y+x+z'), rotationIndex('-x-y+z')]) {
      const p = slicePart(mesh, rotation, 0.1);
      expect(p.areaMm2.length).toBe(400);
      for (let k = 0; k < p.areaMm2.length; k++) {
        expect(p.areaMm2[k]).toBeCloseTo(ngonArea(n, r), 9);
        expect(p.contourMm[k]).toBeCloseTo(ngonPerimeter(n, r), 9);
        expect(Math.PI * r * r - p.areaMm2[k]).toBeLessThanOrEqual((Math.PI * r * r * ((2 * Math.PI) / n) ** 2) / 6);
        expect(Math.PI * r * r - p.areaMm2[k]).toBeGreaterThanOrEqual(0);
      }
    }
  });

  test('upside down it is the same cylinder', () => {
    const p = slicePart(mesh, rotationIndex('+x-y-z'), 0.1);
    for (let k = 0; k < p.areaMm2.length; k++) expect(p.areaMm2[k]).toBeCloseTo(ngonArea(n, r), 9);
  });

  test('lying on its side: a rectangle of the chord width times the length', () => {
    // Chord of the n-gon at height y from its centre lies between those of the circles of radius r cos(pi/n)
    // (the apothem: the n-gon contains that circle) and r.
    const rotation = rotationIndex('xzy'); // part z along chamber y, part y up
    const up = upAxisOfRotation(rotation);
    expect(up.axis).toBe(1);
    const h = 0.2;
    const p = slicePart(mesh, rotation, h);
    const [lo] = upRange(mesh, up);
    const apothem = r * Math.cos(Math.PI / n);
    for (let k = 0; k < p.areaMm2.length; k++) {
      const y = up.sign * (lo + (k + 0.5) * h);
      const widthMax = 2 * Math.sqrt(Math.max(0, r * r - y * y));
      const widthMin = 2 * Math.sqrt(Math.max(0, apothem * apothem - y * y));
      expect(p.areaMm2[k]).toBeLessThanOrEqual(widthMax * height + 1e-9);
      expect(p.areaMm2[k]).toBeGreaterThanOrEqual(widthMin * height - 1e-9);
      // A rectangle's perimeter: two lengths and two widths.
      expect(p.contourMm[k]).toBeCloseTo(2 * height + (2 * p.areaMm2[k]) / height, 9);
    }
  });
});

describe('cone of radius 12 and height 30: section pi (r (1 - z/h))^2 (similar figures)', () => {
  const r = 12;
  const height = 30;
  const n = 64;
  test('each layer is the inscribed 64-gon of the shrinking circle', () => {
    const p = slicePart(cone(r, height, n), 0, 0.1);
    expect(p.areaMm2.length).toBe(300);
    for (let k = 0; k < p.areaMm2.length; k++) {
      const z = (k + 0.5) * 0.1;
      const rz = r * (1 - z / height);
      expect(p.areaMm2[k]).toBeCloseTo(ngonArea(n, rz), 9);
      expect(p.contourMm[k]).toBeCloseTo(ngonPerimeter(n, rz), 9);
      const smooth = Math.PI * rz * rz;
      expect(smooth - p.areaMm2[k]).toBeLessThanOrEqual((smooth * ((2 * Math.PI) / n) ** 2) / 6 + 1e-12);
    }
    // Volume of a pyramid: 1/3 base x height. The layer sums are a composite midpoint rule on A(z) = base (1 - z/H)^2,
    // short of the integral by exactly H h^2 A'' / 24 = h^2 base / (12 H) for a quadratic (Burden & Faires, Numerical Analysis, composite midpoint rule).
    const base = ngonArea(n, r);
    const exact = (base * height) / 3;
    const midpointError = -(0.1 * 0.1 * base) / (12 * height);
    expect(sum(p.areaMm2) * 0.1).toBeCloseTo(exact + midpointError, 6);
  });

  test('point down, the layers run the other way', () => {
    const up = slicePart(cone(r, height, n), 0, 0.1);
    const down = slicePart(cone(r, height, n), rotationIndex('+x-y-z'), 0.1);
    for (let k = 0; k < up.areaMm2.length; k++) expect(down.areaMm2[k]).toBeCloseTo(up.areaMm2[up.areaMm2.length - 1 - k], 9);
  });
});

describe('the 3MF specification example box (3MF Core Specification, Appendix B.2)', () => {
  const CONTENT_TYPES =
    '<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
    '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>' +
    '<Default Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/></Types>';
  const RELS =
    '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
    '<Relationship Target="/3D/3dmodel.model" Id="rel0" Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/></Relationships>';
  function exampleBox(): MeshData {
    const bytes = zipSync({
      '[Content_Types].xml': strToU8(CONTENT_TYPES),
      '_rels/.rels': strToU8(RELS),
      '3D/3dmodel.model': fixture('3mf-core-example-box.model'),
    });
    const parsed = parse3mf(bytes, { filename: 'box.3mf' });
    if (!parsed.ok) throw new Error(parsed.problems[0].message);
    return parsed.parts[0];
  }

  test('standing: 39.998 x 40.000 in every layer, contour 159.996', () => {
    const p = slicePart(exampleBox(), 0, 0.1);
    expect(p.areaMm2.length).toBe(400); // 39.998 / 0.1 rounds up to 400 layers
    for (let k = 0; k < 400; k++) {
      expect(p.areaMm2[k]).toBeCloseTo(39.998 * 40, 8);
      expect(p.contourMm[k]).toBeCloseTo(2 * (39.998 + 40), 8);
    }
    // 400 layers of 0.1 mm hold 0.002 mm more than the box: the slicing error, one footprint x 0.002.
    expect(sum(p.areaMm2) * 0.1 - 63993.60016).toBeCloseTo(39.998 * 40 * 0.002, 6);
  });

  test('its section at mid height is one closed counter-clockwise loop', () => {
    const loops = sliceLoops(exampleBox(), 0, 20);
    expect(loops).toHaveLength(1);
    expect(loops[0].closed).toBe(true);
    expect(loops[0].areaMm2).toBeCloseTo(39.998 * 40, 8);
    expect(loops[0].lengthMm).toBeCloseTo(159.996, 8);
  });

  test('on its side: 40.000 x 39.998 sections over 39.998 of height', () => {
    const p = slicePart(exampleBox(), rotationIndex('zxy'), 0.1);
    expect(p.heightMm).toBeCloseTo(40, 9);
    for (let k = 0; k < p.areaMm2.length; k++) expect(p.areaMm2[k]).toBeCloseTo(39.998 * 39.998, 8);
  });
});

describe('sections with holes', () => {
  test('a tube: the outer loop counts, the bore is taken out (annulus of two 64-gons)', () => {
    const outer = cylinder(10, 20, 64);
    const inner = flipAll(cylinder(6, 20, 64));
    const k = outer.positions.length / 3;
    const tube: MeshData = {
      positions: Float64Array.from([...outer.positions, ...inner.positions]),
      indices: Uint32Array.from([...outer.indices, ...Array.from(inner.indices, (i) => i + k)]),
    };
    const p = slicePart(tube, 0, 0.5);
    expect(p.areaMm2[10]).toBeCloseTo(ngonArea(64, 10) - ngonArea(64, 6), 9);
    expect(p.contourMm[10]).toBeCloseTo(ngonPerimeter(64, 10) + ngonPerimeter(64, 6), 9);
    const loops = sliceLoops(tube, 0, 5).sort((a, b) => b.areaMm2 - a.areaMm2);
    expect(loops.map((l) => l.closed)).toEqual([true, true]);
    expect(loops[0].areaMm2).toBeCloseTo(ngonArea(64, 10), 9);
    expect(loops[1].areaMm2).toBeCloseTo(-ngonArea(64, 6), 9);
  });

  test('an open mesh gives an open loop, never a made-up closed one', () => {
    const b = box(10, 10, 10);
    const open: MeshData = { positions: b.positions, indices: b.indices.slice(0, b.indices.length - 6) }; // one side removed
    const loops = sliceLoops(open, 0, 5);
    expect(loops).toHaveLength(1);
    expect(loops[0].closed).toBe(false);
    expect(loops[0].lengthMm).toBeCloseTo(30, 9);
  });
});

describe('layout profiles: each placed part sliced at the layout layer middles', () => {
  const h = 0.1;

  test('two boxes at heights that are not whole layers: the layers whose middle lies inside each', () => {
    const mesh = box(10, 20, 5);
    const parts = [{ key: 'box', mesh }];
    const placements = [
      { part: 0, position: [0, 0, 3.02], size: [10, 20, 5], transform: placementTransform(0, [0, 0, 0], [10, 20, 5], [0, 0, 3.02]) },
      { part: 0, position: [30, 0, 4.27], size: [20, 10, 5], transform: placementTransform(2, [0, 0, 0], [10, 20, 5], [30, 0, 4.27]) },
    ];
    const layers = 100;
    const got = layoutProfiles({ parts, placements, layerHeightMm: h, layers });
    for (let L = 0; L < layers; L++) {
      const z = (L + 0.5) * h;
      const inA = z > 3.02 && z <= 8.02 ? 1 : 0;
      const inB = z > 4.27 && z <= 9.27 ? 1 : 0;
      expect(got.areaProfile[L]).toBeCloseTo(200 * (inA + inB), 8);
      expect(got.contourProfile[L]).toBeCloseTo(60 * (inA + inB), 8);
    }
    expect(got.meshPlacements).toBe(2);
  });

  test('a part without a mesh counts as its box, and says so', () => {
    const got = layoutProfiles({
      parts: [{ key: 'unknown', mesh: null }],
      placements: [{ part: 0, position: [0, 0, 1], size: [4, 5, 2] }],
      layerHeightMm: 0.5,
      layers: 8,
    });
    expect(Array.from(got.areaProfile)).toEqual([0, 0, 20, 20, 20, 20, 0, 0]);
    expect(Array.from(got.contourProfile)).toEqual([0, 0, 18, 18, 18, 18, 0, 0]);
    expect(got.boxPlacements).toBe(1);
  });

  test('placed in any rotation at any height, the layout profile equals the placed mesh sliced in chamber coordinates', () => {
    const mesh = cone(12, 30, 48);
    const m = measureMesh(mesh);
    const rotations = [0, 4, 9, 17, 23];
    const placements = rotations.map((rot, i) => {
      const position = [20 + 40 * i, 30, 5 + 0.0371 * i * i];
      const t = placementTransform(rot, m.bboxMinMm, m.bboxMaxMm, position);
      const b = rotatedBox(rot, m.bboxMinMm, m.bboxMaxMm);
      return { part: 0, position, size: [0, 1, 2].map((a) => b.max[a] - b.min[a]), transform: t };
    });
    const layers = 400;
    const got = layoutProfiles({ parts: [{ key: 'cone', mesh }], placements, layerHeightMm: h, layers });
    const expected = new Float64Array(layers);
    for (const pl of placements) {
      const s = sliceAlong(transformMesh(mesh, pl.transform), { axis: 2, sign: 1 }, h / 2, h, layers);
      for (let L = 0; L < layers; L++) expected[L] += s.areaMm2[L];
    }
    for (let L = 0; L < layers; L++) expect(got.areaProfile[L]).toBeCloseTo(expected[L], 6);
    // And the layout holds five cones' volume, within the slicing error of each.
    const bound = rotations.reduce((b, rot) => b + slicingErrorBoundMm3(mesh, upAxisOfRotation(rot), h), 0);
    expect(Math.abs(sum(got.areaProfile) * h - 5 * m.volumeMm3)).toBeLessThanOrEqual(bound);
  });

  test('copies at the same height are sliced once (the cache), at other heights again', () => {
    const mesh = uvSphere(5, 32, 16);
    const cache = new SliceCache();
    const at = (x: number, z: number) => ({
      part: 0,
      position: [x, 0, z],
      size: [10, 10, 10],
      transform: placementTransform(0, [-5, -5, -5], [5, 5, 5], [x, 0, z]),
    });
    const placements = [at(0, 5), at(20, 5), at(40, 5), at(60, 5.3), at(80, 5.03)];
    const got = layoutProfiles({ parts: [{ key: 'ball', mesh }], placements, layerHeightMm: h, layers: 200, cache });
    expect(cache.misses).toBe(2); // z = 5 and 5.3 are three layers apart: the same planes through the ball; 5.03 is not
    expect(cache.hits).toBe(3);
    expect(got.meshPlacements).toBe(5);
  });
});
