/**
 * Generated concave mixes for benchmarks and tests: brackets, channels, open
 * housings, clips, rings and small solids from the project's own parametric
 * builders, in random sizes (seeded), several copies of each design; on
 * request also tapered cups, which stack.
 */
import { bracket, cableGuide, clip, housing, prism, taperedCup, torus } from '../../geometry/generate';
import { createRandom } from '../prng';
import { INSTANCE_FORMAT_V2, type Fit, type PackInstanceV2, type PackPartV2, type PartMesh, type Vec3 } from '../types';
import { measureMesh } from '../../geometry/metrics';

export interface ShapeMixOptions {
  /** Total number of parts (copies included). */
  parts: number;
  seed: number;
  chamber?: Vec3;
  spacing?: number;
  timeLimitMs?: number;
  fit?: Fit;
  /** Distinct designs; about one per 12 parts by default. */
  designs?: number;
  /** Also three round cups wider at the rim than at the foot (they stack), this many copies each; the rest is as without. */
  cups?: number;
  /**
   * The same parts finely tessellated, as a design tool exports curved faces at a tight chord tolerance: clips of
   * about 6,000 triangles, rings of about 37,000, housings' rounded corners of 96 facets (about 3,000 triangles); the
   * flat-faced parts are the same. The sizes and the copies are the same as without.
   */
  fine?: boolean;
}

function design(kind: number, r: () => number, fine = false): { name: string; mesh: PartMesh } {
  const between = (a: number, b: number) => a + (b - a) * r();
  switch (kind) {
    case 0:
      return { name: 'bracket', mesh: bracket({ legAMm: between(25, 60), legBMm: between(20, 50), thicknessMm: between(3, 5), widthMm: between(12, 30), gussetMm: between(2, 6) }) };
    case 1:
      return { name: 'channel', mesh: cableGuide({ channelWidthMm: between(8, 20), channelDepthMm: between(6, 14), wallMm: between(2, 3), flangeMm: between(5, 10), lengthMm: between(25, 60) }) };
    case 2: {
      const l = between(50, 110);
      return { name: 'housing', mesh: housing({ lengthMm: l, widthMm: between(35, Math.min(l, 70)), heightMm: between(20, 40), wallMm: between(2, 3), floorMm: between(2, 3), cornerRadiusMm: 5, cornerSegments: fine ? 96 : 6 }) };
    }
    case 3:
      return { name: 'clip', mesh: clip({ innerRadiusMm: between(5, 12), wallMm: between(1.5, 3), gapDeg: between(50, 90), widthMm: between(6, 14), segments: fine ? 768 : 32 }) };
    case 4: {
      const major = between(10, 20);
      return { name: 'ring', mesh: torus(major, between(2, Math.min(5, major / 3)), fine ? 384 : 32, fine ? 48 : 12) };
    }
    default: {
      const a = between(6, 16), b = between(6, 16);
      return { name: 'block', mesh: prism([[0, 0], [a, 0], [a, b], [0, b]], 0, between(4, 12)) };
    }
  }
}

/** A "pack-instance/2" of generated meshes, sent inline (no files). */
export function generateShapeMix(o: ShapeMixOptions): PackInstanceV2 {
  const r = createRandom(o.seed);
  const designs = o.designs ?? Math.max(6, Math.round(o.parts / 12));
  const parts: PackPartV2[] = [];
  // Quantities: an even split with some spread, adding up to o.parts.
  const weights = Array.from({ length: designs }, () => 0.5 + r());
  const total = weights.reduce((a, b) => a + b, 0);
  let left = o.parts;
  for (let d = 0; d < designs; d++) {
    const kind = d % 6;
    const { name, mesh } = design(kind, r, o.fine);
    const quantity = d === designs - 1 ? left : Math.min(left, Math.max(1, Math.round((o.parts * weights[d]) / total)));
    left -= quantity;
    const m = measureMesh(mesh);
    parts.push({ id: `${name}-${d + 1}`, size: [m.sizeMm[0], m.sizeMm[1], m.sizeMm[2]], quantity, rotations: Array.from({ length: 24 }, (_, k) => k), meshPath: null, mesh });
  }
  if (o.cups) {
    // Their own random stream: the rest of the mix comes out the same with or without them.
    const rc = createRandom(o.seed * 7919 + 1);
    const between = (a: number, b: number) => a + (b - a) * rc();
    for (let c = 1; c <= 3; c++) {
      const foot = between(12, 22);
      const mesh = taperedCup({ bottomRadiusMm: foot, topRadiusMm: foot + between(6, 16), heightMm: between(12, 32), wallMm: between(1.5, 2.5), floorMm: between(2, 3), segments: 48 });
      const m = measureMesh(mesh);
      parts.push({ id: `cup-${c}`, size: [m.sizeMm[0], m.sizeMm[1], m.sizeMm[2]], quantity: o.cups, rotations: Array.from({ length: 24 }, (_, k) => k), meshPath: null, mesh });
    }
  }
  return {
    format: INSTANCE_FORMAT_V2,
    chamber: o.chamber ?? [300, 300, 380],
    margin: { xy: 8, bottom: 5, top: 5 },
    spacing: o.spacing ?? 3,
    layerHeight: 0.12,
    objective: 'min-height',
    timeLimitMs: o.timeLimitMs ?? 2000,
    seed: o.seed,
    fit: o.fit ?? 'shape',
    parts: parts.filter((p) => p.quantity > 0),
  };
}
