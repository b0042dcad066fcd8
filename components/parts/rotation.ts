/**
 * Quarter turns about x, then y, then z (fixed axes), as the server stores
 * them in rotationDeg. An axis-aligned box stays axis-aligned, so its size is
 * a permutation of the uploaded size:
 *
 *   about x: y <-> z     about y: x <-> z     about z: x <-> y
 *
 * (each swap once per odd number of quarter turns).
 */
export type Rotation = [number, number, number];

export function rotatedSize(uploadedSizeMm: readonly number[], rotationDeg: Rotation): [number, number, number] {
  const s: [number, number, number] = [uploadedSizeMm[0], uploadedSizeMm[1], uploadedSizeMm[2]];
  const odd = (deg: number) => Math.round(deg / 90) % 2 !== 0;
  if (odd(rotationDeg[0])) [s[1], s[2]] = [s[2], s[1]];
  if (odd(rotationDeg[1])) [s[0], s[2]] = [s[2], s[0]];
  if (odd(rotationDeg[2])) [s[0], s[1]] = [s[1], s[0]];
  return s;
}

export function addQuarterTurn(rotationDeg: Rotation, axis: 0 | 1 | 2): Rotation {
  const next: Rotation = [...rotationDeg];
  next[axis] = (next[axis] + 90) % 360;
  return next;
}

/**
 * The mesh turned the same way, for the preview: p' = Rz · Ry · Rx · p with
 * right-handed quarter turns, e.g. about x: (x, y, z) -> (x, -z, y).
 */
export function rotatePositions(positions: Float32Array, rotationDeg: Rotation): Float32Array {
  const turns = rotationDeg.map((d) => ((Math.round(d / 90) % 4) + 4) % 4);
  if (turns.every((t) => t === 0)) return positions;
  const out = new Float32Array(positions.length);
  for (let i = 0; i < positions.length; i += 3) {
    let x = positions[i];
    let y = positions[i + 1];
    let z = positions[i + 2];
    for (let k = 0; k < turns[0]; k++) [y, z] = [-z, y];
    for (let k = 0; k < turns[1]; k++) [x, z] = [z, -x];
    for (let k = 0; k < turns[2]; k++) [x, y] = [-y, x];
    out[i] = x;
    out[i + 1] = y;
    out[i + 2] = z;
  }
  return out;
}
