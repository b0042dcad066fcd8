import { createRandom } from './prng';
import { ORIENTATIONS, type Orientation, type PackInstance, type PackPart, type Vec3 } from './types';

export interface PowderBedOptions {
  /** Total number of parts (sum of quantities). */
  parts: number;
  seed: number;
  chamber?: Vec3;
  timeLimitMs?: number;
  /** Share of small clips among the designs, the rest split over brackets, housings and long thin parts. */
  clipShare?: number;
}

/**
 * An invented powder-bed build for benchmarks and tests: many small clips,
 * some brackets and housings and a few long thin parts, in several copies
 * each; 3 mm spacing and margins of 8 mm at the walls, 5 mm under and over
 * the parts (common practice for nylon powder-bed builds).
 */
export function generatePowderBed(options: PowderBedOptions): PackInstance {
  const random = createRandom(options.seed);
  const between = (a: number, b: number) => Math.round((a + (b - a) * random()) * 10) / 10;
  const clipShare = options.clipShare ?? 0.75;
  const wanted = Math.max(0, Math.floor(options.parts));
  // Never more designs than parts: each design has at least one copy.
  const designs = Math.min(wanted, Math.max(4, Math.round(wanted / 12)));
  const parts: PackPart[] = [];
  // Quantities: random weights scaled to the requested total, each design at least one copy.
  const weights = Array.from({ length: designs }, () => 0.3 + random());
  const sum = weights.reduce((a, b) => a + b, 0);
  const quantities = weights.map((w) => Math.max(1, Math.floor((w / sum) * wanted)));
  let total = quantities.reduce((a, b) => a + b, 0);
  for (let i = 0; designs > 0 && total < wanted; i = (i + 1) % designs, total++) quantities[i]++;
  for (let i = designs - 1; total > wanted; i = (i - 1 + designs) % designs) {
    if (quantities[i] > 1) {
      quantities[i]--;
      total--;
    }
  }
  const upright: Orientation[] = ['xyz', 'yxz'];
  for (let d = 0; d < designs; d++) {
    const r = random();
    let size: Vec3;
    let kind: string;
    let orientations: Orientation[] = [...ORIENTATIONS];
    if (r < clipShare) {
      kind = 'clip';
      size = [between(10, 40), between(8, 25), between(3, 12)];
    } else if (r < clipShare + (1 - clipShare) * 0.5) {
      kind = 'bracket';
      size = [between(30, 60), between(20, 45), between(8, 25)];
    } else if (r < clipShare + (1 - clipShare) * 0.85) {
      kind = 'housing';
      size = [between(40, 90), between(30, 70), between(20, 45)];
      // Housings keep their outer face up for a better surface (common practice).
      orientations = upright;
    } else {
      kind = 'rail';
      size = [between(150, 240), between(8, 20), between(5, 15)];
    }
    parts.push({ id: `${kind}-${d + 1}`, size, quantity: quantities[d], orientations });
  }
  return {
    format: 'pack-instance/1',
    chamber: options.chamber ?? [300, 300, 380],
    margin: { xy: 8, bottom: 5, top: 5 },
    spacing: 3,
    layerHeight: 0.11,
    objective: 'min-height',
    timeLimitMs: options.timeLimitMs ?? 2000,
    seed: options.seed,
    parts,
  };
}
