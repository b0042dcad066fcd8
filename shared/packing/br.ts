import { ORIENTATIONS, type Orientation, type PackInstance } from './types';

/**
 * Reads a container-loading test file in the format of Bischoff & Ratcliff,
 * "Issues in the development of approaches to container loading", Omega 23(4),
 * 1995 (OR-Library thpack files): per problem the container L W H and per box
 * type its three dimensions, each followed by a 0/1 flag saying whether it may
 * stand vertically, and the quantity.
 *
 * Returns `max-volume` instances with zero spacing and margins; dimension d may
 * point up (along z) only where its flag is 1.
 */
export function parseBischoffRatcliff(text: string, timeLimitMs = 2000): Array<{ problem: number; instance: PackInstance }> {
  const nums = text.trim().split(/\s+/).map(Number);
  let at = 0;
  const next = () => {
    if (at >= nums.length) throw new Error('container-loading file ends early');
    return nums[at++];
  };
  const count = next();
  const out: Array<{ problem: number; instance: PackInstance }> = [];
  for (let p = 0; p < count; p++) {
    const problem = next();
    next(); // generator seed
    const L = next(), W = next(), H = next();
    const types = next();
    const parts = [];
    for (let t = 0; t < types; t++) {
      const index = next();
      const l = next(), fl = next(), w = next(), fw = next(), h = next(), fh = next();
      const q = next();
      const upright = [fl, fw, fh];
      const letters = 'xyz';
      const orientations = ORIENTATIONS.filter((o) => upright[letters.indexOf(o[2])] === 1) as Orientation[];
      parts.push({ id: `box-${index}`, size: [l, w, h] as [number, number, number], quantity: q, orientations });
    }
    out.push({
      problem,
      instance: {
        format: 'pack-instance/1',
        chamber: [L, W, H],
        margin: { xy: 0, bottom: 0, top: 0 },
        spacing: 0,
        layerHeight: 0.1,
        objective: 'max-volume',
        timeLimitMs,
        seed: 1,
        parts,
      },
    });
  }
  return out;
}
