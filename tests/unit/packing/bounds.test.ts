import { buildCountLowerBound, lowerBound } from '@/shared/packing';
import { instanceOf } from './helpers';

// The volume term is the continuous bound of Martello, Pisinger & Vigo, "The three-dimensional
// bin packing problem", Operations Research 48(2), 2000, on spacing-inflated boxes; cases by hand.
describe('height lower bound', () => {
  test('eight 10 mm cubes on a 20 x 20 base stack at least 20 mm high', () => {
    const inst = instanceOf({ format: 'pack-instance/1', chamber: [20, 20, 100], parts: [{ id: 'c', size: [10, 10, 10], quantity: 8 }] });
    // 8 * 1000 / (20 * 20) = 20
    expect(lowerBound(inst)).toBeCloseTo(20, 9);
  });

  test('spacing inflates boxes and base alike, and the bottom margin is added', () => {
    const inst = instanceOf({
      format: 'pack-instance/1',
      chamber: [38, 38, 200],
      margin: { xy: 4, bottom: 5, top: 5 },
      spacing: 2,
      parts: [{ id: 'c', size: [10, 10, 10], quantity: 9 }],
    });
    // Ux = Uy = 30; 9 * 12^3 / (32 * 32) - 2 = 15.1875 - 2 = 13.1875; plus bottom 5.
    expect(lowerBound(inst)).toBeCloseTo(18.1875, 9);
  });

  test('a tall part that must stand up sets the bound when the volume is small', () => {
    const inst = instanceOf({
      format: 'pack-instance/1',
      chamber: [300, 300, 380],
      margin: { bottom: 3 },
      parts: [{ id: 'post', size: [10, 10, 120], quantity: 1, orientations: ['xyz', 'yxz'] }],
    });
    expect(lowerBound(inst)).toBeCloseTo(123, 9);
  });

  test('a part that may lie down counts with its smallest vertical extent', () => {
    const inst = instanceOf({ format: 'pack-instance/1', chamber: [300, 300, 380], parts: [{ id: 'post', size: [10, 20, 120], quantity: 1 }] });
    // max(10, 24000 / 90000) = 10
    expect(lowerBound(inst)).toBeCloseTo(10, 9);
  });

  test('zero parts give the bottom margin', () => {
    const inst = instanceOf({ format: 'pack-instance/1', chamber: [300, 300, 380], margin: { bottom: 5 }, spacing: 3, parts: [] });
    expect(lowerBound(inst)).toBe(5);
  });
});

describe('build count lower bound', () => {
  test('is the ceiling of inflated part volume over inflated chamber volume', () => {
    const inst = instanceOf({ format: 'pack-instance/1', chamber: [20, 20, 20], parts: [{ id: 'c', size: [10, 10, 10], quantity: 17 }] });
    // 17 * 1000 / 8000 = 2.125 -> 3 (Martello, Pisinger & Vigo 2000, L0)
    expect(buildCountLowerBound(inst)).toBe(3);
  });
});
