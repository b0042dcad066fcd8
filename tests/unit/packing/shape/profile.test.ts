/**
 * A part's column profile (per plan cell, the lowest and highest point of the
 * part in that closed column) against elementary geometry: a wedge whose top
 * rises linearly, z = H x / L, has in the column over [x0, x1] its highest
 * point at x1 (or at L where x1 passes the end), its lowest on the floor.
 * Turned upside down, the slope is underneath: the lowest point is H less the
 * same rise. Turned a quarter about z, the rise runs along the rows instead of
 * the columns. A square pyramid, z = H (1 - 2 max(|x - c|, |y - c|) / S), has
 * in each column its highest point where the cell comes nearest its axis.
 */
import { ROTATION_CODES } from '@/shared/geometry/rotations';
import type { PartMesh } from '@/shared/packing';
import { shapeParts } from '@/shared/packing/shape/parts';
import { columnProfile } from '@/shared/packing/shape/profile';
import { shapeInstance } from './instance';

const L = 20, H = 10, W = 6;
/** The triangle (0, 0), (L, 0), (L, H) in the xz plane, extruded from y = 0 to W; outward faces. */
const wedge: PartMesh = {
  positions: new Float64Array([0, 0, 0, L, 0, 0, L, 0, H, 0, W, 0, L, W, 0, L, W, H]),
  indices: new Uint32Array([0, 1, 2, 3, 5, 4, 0, 3, 4, 0, 4, 1, 1, 4, 5, 1, 5, 2, 0, 2, 5, 0, 5, 3]),
};
const [part] = shapeParts(shapeInstance([{ id: 'wedge', mesh: wedge, quantity: 1 }], 2));
const rise = (cellIndex: number, cell: number) => (H / L) * Math.min((cellIndex + 1) * cell, L);

/**
 * A column's value `got` holds the true `value` on the safe side (a top at or above it, a bottom at or below) and
 * within 1e-6 mm of it (the cells are closed, widened by 1e-9 mm against rounding, so a slope adds a trace).
 */
const holds = (got: number, value: number, side: 'top' | 'bottom') => {
  if (side === 'top') expect(got).toBeGreaterThanOrEqual(value - 1e-12);
  else expect(got).toBeLessThanOrEqual(value + 1e-12);
  expect(Math.abs(got - value)).toBeLessThan(1e-6);
};

/** Every column of a profile as [i, j, bottom, top]. */
const columns = (p: ReturnType<typeof columnProfile>) => Array.from(p.cellX, (i, k) => [i, p.cellY[k], p.bottom[k], p.top[k]]);

describe('column profile of a wedge', () => {
  test.each([1.5, 0.7])('upright, cell %s mm: the top of each column is the rise at its far edge, the bottom the floor', (cell) => {
    const p = columnProfile(part, ROTATION_CODES.indexOf('+x+y+z'), cell, 2);
    expect(p.extent).toEqual([L, W, H]);
    expect([p.nx, p.ny]).toEqual([Math.ceil(L / cell), Math.ceil(W / cell)]);
    expect(p.cellX).toHaveLength(p.nx * p.ny);
    for (const [i, , bottom, top] of columns(p)) {
      holds(bottom, 0, 'bottom');
      holds(top, rise(i, cell), 'top');
    }
  });

  test('upside down: the slope is underneath, each column\'s lowest point is H less the rise at its far edge', () => {
    const cell = 1.5;
    const p = columnProfile(part, ROTATION_CODES.indexOf('+x-y-z'), cell, 2);
    expect(p.cellX).toHaveLength(p.nx * p.ny);
    for (const [i, , bottom, top] of columns(p)) {
      holds(bottom, H - rise(i, cell), 'bottom');
      holds(top, H, 'top');
    }
  });

  test('a quarter turn about z: the rise runs along the rows', () => {
    const cell = 1.5;
    const p = columnProfile(part, ROTATION_CODES.indexOf('-y+x+z'), cell, 2);
    expect(p.extent).toEqual([W, L, H]);
    expect(p.cellX).toHaveLength(p.nx * p.ny);
    for (const [, j, bottom, top] of columns(p)) {
      holds(bottom, 0, 'bottom');
      holds(top, rise(j, cell), 'top');
    }
  });
});

describe('column profile of a square pyramid', () => {
  const S = 20, P = 12, c = S / 2;
  // Base corners 0-3, apex 4; four sloping faces and the base, outward.
  const pyramid: PartMesh = {
    positions: new Float64Array([0, 0, 0, S, 0, 0, S, S, 0, 0, S, 0, c, c, P]),
    indices: new Uint32Array([0, 1, 4, 1, 2, 4, 2, 3, 4, 3, 0, 4, 0, 2, 1, 0, 3, 2]),
  };
  const [pyramidPart] = shapeParts(shapeInstance([{ id: 'pyramid', mesh: pyramid, quantity: 1 }], 2));
  /** How far the closed interval [a, b] stays from c. */
  const away = (a: number, b: number) => Math.max(0, a - c, c - b);

  test.each([1.5, 0.7])('cell %s mm: each column\'s top is the slope where the cell comes nearest the apex', (cell) => {
    const p = columnProfile(pyramidPart, ROTATION_CODES.indexOf('+x+y+z'), cell, 2);
    expect(p.cellX).toHaveLength(p.nx * p.ny);
    for (const [i, j, bottom, top] of columns(p)) {
      const d = Math.max(away(i * cell, Math.min((i + 1) * cell, S)), away(j * cell, Math.min((j + 1) * cell, S)));
      holds(bottom, 0, 'bottom');
      holds(top, P * (1 - (2 * d) / S), 'top');
    }
  });
});

describe('column profile of one sloping triangle', () => {
  // Plan (0, 0), (Lx, 0), (a, Wy), rising with x: at plan row y it spans x from a y / Wy to Lx - (Lx - a) y / Wy,
  // widest at the row's near edge. (No corner of the triangle's edges falls on a cell line at 1.5 mm.)
  const Lx = 21, a = 7, Wy = 9, Hz = 8;
  const triangle: PartMesh = { positions: new Float64Array([0, 0, 0, Lx, 0, Hz, a, Wy, (Hz * a) / Lx]), indices: new Uint32Array([0, 1, 2]) };
  const [trianglePart] = shapeParts(shapeInstance([{ id: 'triangle', mesh: triangle, quantity: 1 }], 2));

  test('each column holds the triangle from where it starts in the cell to where it ends, and no empty column is listed', () => {
    const cell = 1.5;
    const p = columnProfile(trianglePart, ROTATION_CODES.indexOf('+x+y+z'), cell, 2);
    const found = new Map(columns(p).map(([i, j, bottom, top]) => [`${i},${j}`, [bottom, top]]));
    let expected = 0;
    for (let j = 0; j < p.ny; j++) {
      const y0 = j * cell;
      const [from, to] = [(a * y0) / Wy, Lx - ((Lx - a) * y0) / Wy];
      for (let i = 0; i < p.nx; i++) {
        const [x0, x1] = [i * cell, (i + 1) * cell];
        if (x0 > to || x1 < from) {
          expect(found.has(`${i},${j}`)).toBe(false);
          continue;
        }
        expected++;
        const [bottom, top] = found.get(`${i},${j}`)!;
        holds(bottom, (Hz * Math.max(x0, from)) / Lx, 'bottom');
        holds(top, (Hz * Math.min(x1, to)) / Lx, 'top');
      }
    }
    expect(p.cellX).toHaveLength(expected);
  });
});
