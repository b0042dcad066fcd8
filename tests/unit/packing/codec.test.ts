import { placementTransform, rotatedExtent, ROTATION_CODES } from '../../../shared/geometry/rotations';
import {
  decodeLayout,
  decodePlacementBytes,
  encodeLayout,
  encodePlacementBytes,
  fromPlacementArrays,
  PlacementBytesError,
  toPlacementArrays,
  type PackResult,
  type Placement,
  type Vec3,
} from '../../../shared/packing';

const hex = (b: Uint8Array) => Buffer.from(b.buffer, b.byteOffset, b.byteLength).toString('hex');
const fromHex = (h: string) => new Uint8Array(Buffer.from(h, 'hex'));

/** Two parts in their own axes, as a layout's instance gives them. */
const OWN: Record<string, Vec3> = { bracket: [40, 20, 10], clip: [12, 8, 5] };
const sizeOf = (id: string) => OWN[id];

/** A layout of three boxes: upright, laid on a side (zxy), and turned a quarter about z (yxz). */
const BOXES: Placement[] = [
  { id: 'bracket', position: [8, 8, 5], size: [40, 20, 10], orientation: 'xyz' },
  { id: 'clip', position: [51.25, 8, 5], size: [5, 12, 8], orientation: 'zxy' },
  { id: 'bracket', position: [8, 31.5, 5.125], size: [20, 40, 10], orientation: 'yxz' },
];

/**
 * The bytes the server wrote for BOXES in placement format 1, before this
 * codec: part ids ['bracket', 'clip']. Float64 little-endian (IEEE 754
 * binary64: 8.0 is 0x4020000000000000, so its bytes read 00..00 20 40), then
 * the Uint32 part indices 0 1 0, then the orientation codes 0 4 2.
 */
const FORMAT_1_BYTES = [
  ['0000000000002040', '0000000000002040', '0000000000001440'], // 8, 8, 5
  ['0000000000a04940', '0000000000002040', '0000000000001440'], // 51.25, 8, 5
  ['0000000000002040', '0000000000803f40', '0000000000801440'], // 8, 31.5, 5.125
  ['00000000', '01000000', '00000000'], // part indices 0, 1, 0
  ['00', '04', '02'], // orientations xyz, zxy, yxz
]
  .flat()
  .join('');

describe('stored placement bytes', () => {
  test('a layout stored in format 1 by the earlier server still opens with the same placements', () => {
    const bytes = fromHex(FORMAT_1_BYTES);
    expect(bytes.length).toBe(29 * 3);
    const decoded = decodePlacementBytes(1, bytes, 3, ['bracket', 'clip'], sizeOf);
    expect(fromPlacementArrays(decoded)).toEqual(BOXES);
    expect(Array.from(decoded.rotations)).toEqual([0, 4, 2]);
  });

  test('the same layout round-trips in format 2: a 16-byte header, then the format-1 sections with rotation codes', () => {
    const arrays = toPlacementArrays(BOXES, ['bracket', 'clip']);
    const bytes = encodePlacementBytes(arrays);
    expect(bytes.length).toBe(16 + 29 * 3);
    // Box orientations keep their codes (0..5 are the same in both formats), so the sections match byte for byte.
    expect(hex(bytes.subarray(16))).toBe(FORMAT_1_BYTES);
    const back = decodePlacementBytes(2, bytes, 3, ['bracket', 'clip'], sizeOf);
    expect(fromPlacementArrays(back)).toEqual(BOXES);
    expect(back.translations).toBeUndefined();
  });

  test('every one of the 24 rotations, with its 3MF transform and the layer profiles, round-trips exactly', () => {
    // A mesh whose bounding box sits off its own origin, as files often do.
    const meshMin: Vec3 = [-3, 2, 1];
    const meshMax: Vec3 = [21, 14, 9];
    const own: Vec3 = [24, 12, 8];
    const placements: Placement[] = ROTATION_CODES.map((_, r) => {
      const position: Vec3 = [10 + 30 * (r % 6), 10 + 30 * Math.floor(r / 6), 0.3 * r];
      return { id: 'housing', position, size: rotatedExtent(r, own), orientation: 'xyz', transform: placementTransform(r, meshMin, meshMax, position) };
    });
    const areaProfile = [0, 12.5, 300.25, 1e-3];
    const contourProfile = [0, 14, 70.5, 0.2];
    const arrays = toPlacementArrays(placements);
    expect(Array.from(arrays.rotations)).toEqual(ROTATION_CODES.map((_, r) => r));
    const bytes = encodePlacementBytes(arrays, { areaProfile, contourProfile });
    expect(bytes.length).toBe(16 + 53 * 24 + 2 * 8 * 4);
    const back = decodePlacementBytes(2, bytes, 24, ['housing'], () => own);
    expect(Array.from(back.areaProfile!)).toEqual(areaProfile);
    expect(Array.from(back.contourProfile!)).toEqual(contourProfile);
    const decoded = fromPlacementArrays(back);
    decoded.forEach((p, r) => {
      expect(p.transform).toEqual(placements[r].transform);
      expect(p.size).toEqual(placements[r].size);
      // 3MF Core §3.3: p' = [x y z 1] M with row vectors. The mesh's box corners, moved by the
      // decoded transform, must fill exactly the placed box.
      const t = p.transform!;
      const lo = [Infinity, Infinity, Infinity];
      const hi = [-Infinity, -Infinity, -Infinity];
      for (let c = 0; c < 8; c++) {
        const q = [c & 1 ? meshMax[0] : meshMin[0], c & 2 ? meshMax[1] : meshMin[1], c & 4 ? meshMax[2] : meshMin[2]];
        for (let j = 0; j < 3; j++) {
          const v = q[0] * t[j] + q[1] * t[3 + j] + q[2] * t[6 + j] + t[9 + j];
          lo[j] = Math.min(lo[j], v);
          hi[j] = Math.max(hi[j], v);
        }
      }
      for (let j = 0; j < 3; j++) {
        expect(lo[j]).toBeCloseTo(p.position[j], 9);
        expect(hi[j] - lo[j]).toBeCloseTo(p.size[j], 9);
      }
    });
  });

  test('an unknown format or bytes that do not match the count are refused, not guessed at', () => {
    const bytes = encodePlacementBytes(toPlacementArrays(BOXES, ['bracket', 'clip']));
    expect(() => decodePlacementBytes(3, bytes, 3, ['bracket', 'clip'], sizeOf)).toThrow(PlacementBytesError);
    expect(() => decodePlacementBytes(2, bytes.subarray(0, bytes.length - 1), 3, ['bracket', 'clip'], sizeOf)).toThrow(/damaged/);
    expect(() => decodePlacementBytes(2, bytes, 4, ['bracket', 'clip'], sizeOf)).toThrow(/damaged/);
    expect(() => decodePlacementBytes(1, fromHex(FORMAT_1_BYTES), 3, ['bracket'], sizeOf)).toThrow(/damaged/);
  });
});

describe('layouts across the worker boundary', () => {
  const result: PackResult = {
    format: 'pack-result/1',
    placements: BOXES,
    unplaced: [{ id: 'clip', count: 3 }],
    height: 15.125,
    layers: 152,
    utilization: 0.25,
    elapsedMs: 12,
  };

  test('carry rotations, transforms and profiles, and come back equal', () => {
    const withShapes: PackResult = {
      ...result,
      placements: BOXES.map((p, i) => (i === 1 ? { ...p, transform: placementTransform(4, [0, 0, 0], OWN.clip, p.position) } : p)),
      areaProfile: [100, 100, 50],
      contourProfile: [60, 60, 30],
    };
    const decoded = decodeLayout(encodeLayout(withShapes));
    expect(decoded.ok).toBe(true);
    if (!decoded.ok) return;
    expect(decoded.result.areaProfile).toEqual([100, 100, 50]);
    expect(decoded.result.contourProfile).toEqual([60, 60, 30]);
    expect(decoded.result.placements[1].transform).toEqual(withShapes.placements[1].transform);
    // A box placement in a layout with transforms gets the transform of its box: same rotation, its box where placed.
    expect(decoded.result.placements[0].transform).toEqual(placementTransform(0, [0, 0, 0], OWN.bracket, BOXES[0].position));
    expect(decoded.result.placements[2].transform).toEqual(placementTransform(2, [0, 0, 0], OWN.bracket, BOXES[2].position));
  });

  test('refuse a rotation code past 23 or a part index past the ids, naming the field', () => {
    const bad = encodeLayout(result);
    bad.rotations[1] = 24;
    const out = decodeLayout(bad);
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.problems[0].field).toBe('rotations[1]');
    const past = encodeLayout(result);
    past.partIndex[2] = 7;
    const out2 = decodeLayout(past);
    expect(!out2.ok && out2.problems[0].field).toBe('partIndex[2]');
  });
});
