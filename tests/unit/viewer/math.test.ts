import fc from 'fast-check';
import {
  LINE_PALETTE,
  UNIT_CUBE,
  boundsOf,
  separateLabels,
  type LabelBox,
  fitCamera,
  framedBounds,
  footprintAreaMm2,
  formatMm,
  groupByPart,
  hexToRgb,
  instanceColours,
  instanceMatrices,
  layerAtHeight,
  lineColour,
  sectionMatrices,
  spanningAt,
  srgbToLinear,
  transformPoint,
  type Vec3,
} from '../../../components/viewer/math';
import { ROTATION_COUNT, UPRIGHT_ROTATIONS, rotatedExtent } from '../../../shared/geometry/rotations';

const corners = (min: ArrayLike<number>, max: ArrayLike<number>): Vec3[] => {
  const out: Vec3[] = [];
  for (let i = 0; i < 8; i++) out.push([i & 1 ? max[0] : min[0], i & 2 ? max[1] : min[1], i & 4 ? max[2] : min[2]]);
  return out;
};

function det3(m: Float32Array, o: number): number {
  const a = (r: number, c: number) => m[o + c * 4 + r];
  return (
    a(0, 0) * (a(1, 1) * a(2, 2) - a(1, 2) * a(2, 1)) -
    a(0, 1) * (a(1, 0) * a(2, 2) - a(1, 2) * a(2, 0)) +
    a(0, 2) * (a(1, 0) * a(2, 1) - a(1, 1) * a(2, 0))
  );
}

describe('instance matrices', () => {
  it('map the unit cube onto each placed box', () => {
    const positions = Float32Array.from([10, 20, 5, 100, 0, 40.5]);
    const sizes = Float32Array.from([24, 12, 8, 3, 4, 5]);
    const m = instanceMatrices(positions, sizes, [0, 1]);
    for (let k = 0; k < 2; k++) {
      const b = boundsOf(corners(UNIT_CUBE.min, UNIT_CUBE.max).flatMap((c) => transformPoint(m, 16 * k, c)));
      for (let a = 0; a < 3; a++) {
        expect(b.min[a]).toBeCloseTo(positions[3 * k + a], 4);
        expect(b.max[a] - b.min[a]).toBeCloseTo(sizes[3 * k + a], 4);
      }
    }
  });

  it('place a mesh at its box in every orientation, with the extents the packing contract gives', () => {
    // The packing contract: "zxy" on a part of size [a, b, c] is placed as [c, a, b].
    const local = { min: [-3, 2, 1], max: [21, 14, 9] }; // size [24, 12, 8], off the origin on purpose
    const own = [24, 12, 8];
    for (let code = 0; code < ROTATION_COUNT; code++) {
      const placed = rotatedExtent(code, own);
      const m = instanceMatrices([7, 8, 9], placed, [0], local, [code]);
      const b = boundsOf(corners(local.min, local.max).flatMap((c) => transformPoint(m, 0, c)));
      for (let a = 0; a < 3; a++) {
        expect(b.min[a]).toBeCloseTo([7, 8, 9][a], 4);
        expect(b.max[a] - b.min[a]).toBeCloseTo(placed[a], 4);
      }
    }
    expect(rotatedExtent(4, own)).toEqual([8, 24, 12]);
  });

  it('turn a part rather than mirror it, so a printed part is drawn with its own handedness', () => {
    const local = { min: [0, 0, 0], max: [24, 12, 8] };
    for (let code = 0; code < ROTATION_COUNT; code++) {
      const m = instanceMatrices([0, 0, 0], rotatedExtent(code, local.max), [0], local, [code]);
      expect(det3(m, 0)).toBeGreaterThan(0);
    }
  });

  it('keep the part\u2019s own top up in the two upright orientations and every upright turn', () => {
    for (const code of [0, 2, ...UPRIGHT_ROTATIONS]) {
      const m = instanceMatrices([0, 0, 0], [10, 10, 10], [0], { min: [0, 0, 0], max: [10, 10, 10] }, [code]);
      // local +z maps to chamber +z
      expect(m[10]).toBeCloseTo(1, 6);
    }
  });

  it('hold for random boxes: every corner of the unit cube lands inside its box', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.float({ min: 0, max: 500, noNaN: true }), fc.float({ min: Math.fround(0.1), max: 300, noNaN: true })), { minLength: 3, maxLength: 30 }),
        (pairs) => {
          const n = Math.floor(pairs.length / 3);
          const positions = Float32Array.from(pairs.slice(0, 3 * n).map((p) => p[0]));
          const sizes = Float32Array.from(pairs.slice(0, 3 * n).map((p) => p[1]));
          const order = Uint32Array.from({ length: n }, (_, i) => n - 1 - i);
          const m = instanceMatrices(positions, sizes, order);
          for (let k = 0; k < n; k++) {
            const i = order[k];
            for (const c of corners(UNIT_CUBE.min, UNIT_CUBE.max)) {
              const p = transformPoint(m, 16 * k, c);
              for (let a = 0; a < 3; a++) {
                const tol = 1e-3 * Math.max(1, positions[3 * i + a] + sizes[3 * i + a]);
                expect(p[a]).toBeGreaterThanOrEqual(positions[3 * i + a] - tol);
                expect(p[a]).toBeLessThanOrEqual(positions[3 * i + a] + sizes[3 * i + a] + tol);
              }
            }
          }
        },
      ),
    );
  });
});

describe('grouping placements by part', () => {
  it('gives each part its placements in order, so instance j of a part maps back to one placement', () => {
    const partIndex = Uint32Array.from([2, 0, 2, 5, 0, 2]);
    const g = groupByPart(partIndex);
    expect(Array.from(g.parts)).toEqual([0, 2, 5]);
    expect(Array.from(g.offsets)).toEqual([0, 2, 5, 6]);
    expect(Array.from(g.order)).toEqual([1, 4, 0, 2, 5, 3]);
  });

  it('is a permutation of the placements for any layout', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 40 }), { maxLength: 300 }), (ids) => {
        const g = groupByPart(Uint32Array.from(ids));
        expect(Array.from(g.order).sort((a, b) => a - b)).toEqual(ids.map((_, i) => i));
        for (let k = 0; k < g.parts.length; k++) {
          for (let j = g.offsets[k]; j < g.offsets[k + 1]; j++) expect(ids[g.order[j]]).toBe(g.parts[k]);
        }
      }),
    );
  });

  it('handles an empty layout', () => {
    const g = groupByPart(new Uint32Array(0));
    expect(g.parts.length).toBe(0);
    expect(Array.from(g.offsets)).toEqual([0]);
  });
});

describe('cross-section at a height', () => {
  // three boxes: floor 0-10, 5-15 and 20-30 mm
  const positions = Float32Array.from([0, 0, 0, 20, 0, 5, 40, 0, 20]);
  const sizes = Float32Array.from([10, 10, 10, 5, 8, 10, 2, 3, 10]);

  it('lists the boxes that hold material in the layer under the cut', () => {
    expect(Array.from(spanningAt(positions, sizes, 7))).toEqual([0, 1]);
    expect(Array.from(spanningAt(positions, sizes, 17))).toEqual([]);
    expect(Array.from(spanningAt(positions, sizes, 25))).toEqual([2]);
  });

  it('counts a box in the layer at its top and not in the layer at its foot', () => {
    expect(Array.from(spanningAt(positions, sizes, 10))).toEqual([0, 1]);
    expect(Array.from(spanningAt(positions, sizes, 5))).toEqual([0]);
    expect(Array.from(spanningAt(positions, sizes, 0))).toEqual([]);
  });

  it('sums the footprints of the section (10x10 + 5x8 = 140 mm\u00b2)', () => {
    expect(footprintAreaMm2(sizes, spanningAt(positions, sizes, 7))).toBeCloseTo(140, 6);
  });

  it('lays a flat rectangle over each footprint at the cut height', () => {
    const list = spanningAt(positions, sizes, 7);
    const m = sectionMatrices(positions, sizes, list, 7);
    expect(transformPoint(m, 16, [0, 0, 0])).toEqual([20, 0, 7]);
    expect(transformPoint(m, 16, [1, 1, 0])).toEqual([25, 8, 7]);
  });
});

describe('layer numbers', () => {
  it('names the layer whose top is the cut, with 0.1 mm layers', () => {
    expect(layerAtHeight(0, 0.1)).toBe(0);
    expect(layerAtHeight(0.1, 0.1)).toBe(1);
    expect(layerAtHeight(0.15, 0.1)).toBe(2);
    // 0.1 * 3 is 0.30000000000000004 in binary floating point: still layer 3
    expect(layerAtHeight(0.1 * 3, 0.1)).toBe(3);
    expect(layerAtHeight(123.4, 0.1)).toBe(1234);
  });
});

/**
 * Colour-vision deficiency simulation: Machado, Oliveira & Fernandes 2009,
 * "A Physiologically-based Model for Simulation of Color Vision Deficiency"
 * (IEEE TVCG 15(6)), severity 1.0 matrices on linear RGB (values from memory
 * of the paper's table; each row sums to 1, which the first test checks).
 * Differences are CIE 1976 L*a*b* distances (CIE 15:2004), D65 white, sRGB
 * primaries (IEC 61966-2-1).
 */
const CVD: Record<string, number[][]> = {
  'normal vision': [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
};

function labOf(linear: number[]): Vec3 {
  const [r, g, b] = linear.map((v) => Math.min(1, Math.max(0, v)));
  const x = (0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047;
  const y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
  const z = (0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883;
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  return [116 * f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))];
}

describe('line colours', () => {
  it('uses simulation matrices that keep white white', () => {
    for (const m of Object.values(CVD)) for (const row of m) expect(row[0] + row[1] + row[2]).toBeCloseTo(1, 5);
  });

  it.each(Object.keys(CVD))('keeps every pair of lines apart (CIE76 \u0394E \u2265 12) under %s', (name) => {
    const m = CVD[name];
    const labs = LINE_PALETTE.map((hex) => {
      const lin = hexToRgb(hex).map(srgbToLinear);
      return labOf(m.map((row) => row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2]));
    });
    for (let i = 0; i < labs.length; i++) {
      for (let j = i + 1; j < labs.length; j++) {
        const d = Math.hypot(labs[i][0] - labs[j][0], labs[i][1] - labs[j][1], labs[i][2] - labs[j][2]);
        expect({ pair: [LINE_PALETTE[i], LINE_PALETTE[j]], farEnough: d >= 12 }).toEqual({ pair: [LINE_PALETTE[i], LINE_PALETTE[j]], farEnough: true });
      }
    }
  });

  it('repeats the palette past its end and for any line index', () => {
    expect(lineColour(LINE_PALETTE.length)).toBe(LINE_PALETTE[0]);
    expect(lineColour(1)).toBe(LINE_PALETTE[1]);
  });

  it('fills instance colours in linear light (sRGB 0.5 is linear 0.214)', () => {
    // IEC 61966-2-1: ((0.5 + 0.055) / 1.055)^2.4 = 0.21404
    expect(srgbToLinear(0.5)).toBeCloseTo(0.21404, 4);
    const out = instanceColours(Uint32Array.from([0, 3]), [1, 0], ['#000000', '#FFFFFF', '#808080', '#FF0000']);
    expect(Array.from(out)).toEqual([1, 0, 0, 0, 0, 0]);
  });
});

describe('camera fit', () => {
  const bounds = { min: [0, 0, 0] as Vec3, max: [340, 340, 600] as Vec3 };

  it('keeps the whole bounding sphere in view at any aspect', () => {
    for (const aspect of [0.46, 1, 1.6, 3]) {
      const pose = fitCamera(bounds, 'fit', 45, aspect, 1);
      const r = 0.5 * Math.hypot(340, 340, 600);
      const halfV = (45 * Math.PI) / 360;
      const halfH = Math.atan(Math.tan(halfV) * aspect);
      // angle the sphere subtends from the camera: asin(r / d)
      const seen = Math.asin(r / pose.distance);
      expect(seen).toBeLessThanOrEqual(Math.min(halfV, halfH) + 1e-9);
      expect(seen).toBeCloseTo(Math.min(halfV, halfH), 9);
    }
  });

  it('fills the top view with the chamber floor rather than its bounding sphere', () => {
    const aspect = 1.5;
    const pose = fitCamera(bounds, 'top', 45, aspect, 1);
    const halfV = (45 * Math.PI) / 360;
    // the top face (z = 600) is 300 mm nearer than the centre; its 340 mm depth (y) just fits the height
    const toTop = pose.distance - 300;
    expect(Math.atan(170 / toTop)).toBeCloseTo(halfV, 6);
    expect(pose.distance).toBeLessThan(fitCamera(bounds, 'fit', 45, aspect, 1).distance);
  });

  it('keeps the whole front face in view on a narrow phone screen', () => {
    const aspect = 390 / 500;
    const pose = fitCamera(bounds, 'front', 45, aspect, 1);
    const halfH = Math.atan(Math.tan((45 * Math.PI) / 360) * aspect);
    const halfV = (45 * Math.PI) / 360;
    const toFace = pose.distance - 170;
    expect(Math.atan(170 / toFace)).toBeLessThanOrEqual(halfH + 1e-9);
    expect(Math.atan(300 / toFace)).toBeLessThanOrEqual(halfV + 1e-9);
  });

  it('looks at the centre of the box', () => {
    const pose = fitCamera(bounds, 'front', 45, 1.5);
    expect(pose.target).toEqual([170, 170, 300]);
  });

  it('looks down from the top with +y up on screen', () => {
    const pose = fitCamera(bounds, 'top', 45, 1.5);
    const f = pose.target.map((t, a) => (t - pose.position[a]) / pose.distance);
    // looking down z to within a tenth of a degree
    expect(Math.acos(-f[2])).toBeLessThan((0.1 * Math.PI) / 180);
    // the camera's up, made perpendicular to the view, is the chamber's +y
    const dot = pose.up[0] * f[0] + pose.up[1] * f[1] + pose.up[2] * f[2];
    const screenUp = pose.up.map((u, a) => u - dot * f[a]);
    const len = Math.hypot(...screenUp);
    expect(screenUp[1] / len).toBeGreaterThan(0.999);
  });

  it('keeps +z up in the front and side views', () => {
    expect(fitCamera(bounds, 'front', 45, 1).up).toEqual([0, 0, 1]);
    const side = fitCamera(bounds, 'side', 45, 1);
    expect(side.up).toEqual([0, 0, 1]);
    expect(side.position[0]).toBeGreaterThan(340);
  });
});

describe('length labels', () => {
  it('shows a tenth of a millimetre on small parts and whole millimetres on big ones', () => {
    expect(formatMm(24)).toBe('24.0 mm');
    expect(formatMm(12.34)).toBe('12.3 mm');
    expect(formatMm(340.4)).toBe('340 mm');
    expect(formatMm(NaN)).toBe('–');
  });
});

describe('what the views frame', () => {
  // An invented 340 x 340 x 600 mm chamber holding a shallow build: two parts on a 5 mm floor margin, 24 mm tall.
  const chamber: Vec3 = [340, 340, 600];
  const placements = { positions: [10, 10, 5, 200, 150, 5], sizes: [50, 30, 20, 40, 40, 24] };

  it('frames the placed parts by default and the whole chamber on request', () => {
    expect(framedBounds(placements, chamber, 'parts')).toEqual({ min: [10, 10, 5], max: [240, 190, 29] });
    expect(framedBounds(placements, chamber, 'chamber')).toEqual({ min: [0, 0, 0], max: [340, 340, 600] });
    // Nothing placed: the chamber is all there is to show.
    expect(framedBounds({ positions: [], sizes: [] }, chamber, 'parts')).toEqual({ min: [0, 0, 0], max: [340, 340, 600] });
  });

  it('brings the camera close enough that the parts fill the view', () => {
    const parts = fitCamera(framedBounds(placements, chamber, 'parts'), 'fit', 40, 1.6);
    const whole = fitCamera(framedBounds(placements, chamber, 'chamber'), 'fit', 40, 1.6);
    // The parts' bounding sphere has a radius of about 147 mm (half of the 230 x 180 x 24 mm box's diagonal) against
    // the chamber's 384 mm: the camera comes more than two and a half times closer.
    expect(parts.distance * 2.5).toBeLessThan(whole.distance);
    expect(parts.target).toEqual([125, 100, 17]);
  });
});

describe('labels over a view kept apart', () => {
  const overlap = (a: LabelBox, b: LabelBox, gap: number) => Math.abs(a.x - b.x) < (a.w + b.w) / 2 + gap - 1e-6 && Math.abs(a.y - b.y) < (a.h + b.h) / 2 + gap - 1e-6;

  test('labels that do not touch stay where they are', () => {
    const boxes: LabelBox[] = [
      { x: 100, y: 100, w: 80, h: 18 },
      { x: 300, y: 100, w: 80, h: 18 },
      { x: 200, y: 200, w: 80, h: 18 },
    ];
    expect(separateLabels(boxes)).toEqual(boxes.map((b) => [b.x, b.y]));
  });

  test('three labels anchored near one corner (a flat part seen from above a corner) end apart, the first where it was', () => {
    // The y and z labels' anchors 10 px apart, the x label's overlapping the z one: as on a 90 x 60 x 30 mm housing.
    const boxes: LabelBox[] = [
      { x: 180, y: 466, w: 79, h: 18 },
      { x: 258, y: 470, w: 79, h: 18 },
      { x: 250, y: 475, w: 79, h: 18 },
    ];
    const at = separateLabels(boxes);
    expect(at[0]).toEqual([180, 466]);
    const moved = boxes.map((b, i) => ({ ...b, x: at[i][0], y: at[i][1] }));
    for (let i = 0; i < 3; i++) for (let j = i + 1; j < 3; j++) expect(overlap(moved[i], moved[j], 4)).toBe(false);
    // Pushed apart by no more than the labels' own size: they stay beside their edges.
    moved.forEach((m, i) => expect(Math.hypot(m.x - boxes[i].x, m.y - boxes[i].y)).toBeLessThan(2 * (m.w + m.h)));
  });

  test('a label on the upright edge clears the others upwards, along its edge, even when its anchor is below theirs', () => {
    // The same corner: the z label's anchor 4 px under the y label's. Unmarked it is pushed down, under the corner.
    const boxes: LabelBox[] = [
      { x: 180, y: 466, w: 79, h: 18 },
      { x: 250, y: 470, w: 79, h: 18 },
      { x: 252, y: 474, w: 79, h: 18 },
    ];
    expect(separateLabels(boxes)[2][1]).toBeGreaterThan(474);
    const at = separateLabels(boxes.map((b, i) => ({ ...b, up: i === 2 })));
    expect(at[2][1]).toBeLessThan(474);
    expect(at[2][1]).toBeLessThan(at[1][1]);
    const moved = boxes.map((b, i) => ({ ...b, x: at[i][0], y: at[i][1] }));
    for (let i = 0; i < 3; i++) for (let j = i + 1; j < 3; j++) expect(overlap(moved[i], moved[j], 4)).toBe(false);
    expect(at[0]).toEqual([180, 466]);
  });
});
