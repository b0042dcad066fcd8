import fc from 'fast-check';
import { readNumberAt } from '../../../shared/geometry/text';

const read = (s: string) => readNumberAt(s, 0, s.length);

describe('reading numbers from mesh text', () => {
  test('gives exactly what Number() gives for decimals as exporters print them', () => {
    // Clinger, PLDI 1990: the exact-integer, one-rounding fast path is correctly rounded.
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), fc.integer({ min: 0, max: 12 }), (x, d) => {
        for (const text of [x.toFixed(d), x.toPrecision(d + 1), x.toExponential(d), String(x), String(Math.fround(x))]) {
          expect(Object.is(read(text), Number(text))).toBe(true);
        }
      }),
      { numRuns: 2000 },
    );
  });

  test('reads long, tiny and huge numbers through the slow path unchanged', () => {
    for (const text of ['0.1234567890123456789', '1e-300', '-2.5e+200', '123456789012345678', '.5', '5.', '+3', '-0']) {
      expect(Object.is(read(text), Number(text))).toBe(true);
    }
  });

  test('reads the words for non-finite values and rejects other words', () => {
    expect(read('inf')).toBe(Infinity);
    expect(read('-Infinity')).toBe(-Infinity);
    expect(read('nan')).toBeNaN();
    expect(read('1.2.3')).toBeNaN();
    expect(read('e5')).toBeNaN();
    expect(read('1e')).toBeNaN();
    expect(read('-')).toBeNaN();
  });

  test('reads a number in the middle of a line', () => {
    const line = 'vertex 1.5 -2.25e1 3';
    expect(readNumberAt(line, 7, 10)).toBe(1.5);
    expect(readNumberAt(line, 11, 18)).toBe(-22.5);
  });
});
