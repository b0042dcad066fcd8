/**
 * `npm run check:layout -- INSTANCE.json RESULT.json`: a lab's check of a layout it was given or kept, against the
 * mesh files it has. The layouts below are the hand-made housing-and-cube ones of reference-check.test.ts, written
 * as files: the command must pass the good one by both checks (the project's and manifold-3d's), and fail each
 * wrong one with exit 1, naming the fault; input it cannot read exits 2 with one line.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { housing, writeBinaryStl } from '@/shared/geometry';
import { summariseShapeLayout } from '@/shared/packing';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

const root = join(__dirname, '..', '..', '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'check-layout-'));
const run = (args: string[]) => spawnSync('npx', ['tsx', 'scripts/check-layout.ts', ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
const write = (name: string, body: string | Uint8Array) => {
  const file = join(dir, name);
  writeFileSync(file, body);
  return file;
};

// An open housing, 60 x 40 x 25 mm outside, walls and floor 2 mm, and a 10 mm cube; 3 mm spacing.
const holder = housing({ lengthMm: 60, widthMm: 40, heightMm: 25, wallMm: 2, floorMm: 2, cornerRadiusMm: 4, cornerSegments: 6 });
const cube = box(10, 10, 10);
write('housing.stl', writeBinaryStl(holder));
write('cube.stl', writeBinaryStl(cube));
const body = {
  format: 'pack-instance/2',
  chamber: [200, 200, 200],
  spacing: 3,
  layerHeight: 0.1,
  fit: 'shape',
  parts: [
    { id: 'housing', mesh: 'housing.stl', quantity: 1, orientations: ['upright'] },
    { id: 'cube', mesh: 'cube.stl', quantity: 1 },
  ],
};
const instanceFile = write('instance.json', JSON.stringify(body));
// The same instance in memory, to write the layouts with.
const inst = shapeInstance(
  [
    { id: 'housing', mesh: holder, quantity: 1, orientations: ['upright'] },
    { id: 'cube', mesh: cube, quantity: 1 },
  ],
  3,
);
const H: [number, number, number] = [20, 20, 0];
const layoutFile = (name: string, items: Array<[string, [number, number, number]]>) =>
  write(name, JSON.stringify(summariseShapeLayout(inst, items.map(([id, position]) => ({ id, rotation: 0, position })))));
const check = (result: string, ...more: string[]) => {
  const r = run([instanceFile, result, ...more]);
  return { status: r.status, stderr: r.stderr, out: r.stdout ? JSON.parse(r.stdout) : null };
};

describe('check:layout command line', () => {
  test('the cube on the housing floor, 3 mm from wall and floor: valid by both checks, exit 0', () => {
    const r = check(layoutFile('good.json', [['housing', H], ['cube', [20 + 2 + 3, 20 + 15, 2 + 3]]]));
    expect(r.status).toBe(0);
    expect(r.out.valid).toBe(true);
    expect(r.out.problems).toEqual([]);
    expect(r.out.manifold.faults).toEqual([]);
    // Read back from 32-bit STL coordinates: the spacing to about 1e-5 mm.
    expect(r.out.manifold.smallestGapMm).toBeCloseTo(3, 4);
    expect(r.out.manifold.liftPairs).toBe(1);
  }, 120_000);

  test('the cube through the wall: exit 1, the validator names the placement and manifold-3d the shared volume', () => {
    const r = check(layoutFile('wall.json', [['housing', H], ['cube', [20 - 5, 20 + 15, 5]]]));
    expect(r.status).toBe(1);
    expect(r.out.valid).toBe(false);
    expect(r.out.problems.map((p: { field: string }) => p.field).join()).toMatch(/placements\[1\]/);
    expect(r.out.manifold.faults.join()).toMatch(/placements 0 and 1 share 200\.0\d\d mm\^3/);
  }, 120_000);

  test('the cube inside listed before the housing (lifting the housing takes it along): exit 1 from both checks', () => {
    const r = check(layoutFile('order.json', [['cube', [20 + 2 + 3, 20 + 15, 2 + 3]], ['housing', H]]));
    expect(r.status).toBe(1);
    expect(r.out.problems.map((p: { message: string }) => p.message).join()).toMatch(/lift/i);
    expect(r.out.manifold.faults.join()).toMatch(/placement 1, lifted 3(\.0)? mm, touches placement 0/);
  }, 120_000);

  test('--no-manifold runs the project check alone', () => {
    const r = check(layoutFile('good2.json', [['housing', H], ['cube', [20 + 2 + 3, 20 + 15, 2 + 3]]]), '--no-manifold');
    expect(r.status).toBe(0);
    expect(r.out).toEqual({ valid: true, problems: [], manifold: null });
  }, 120_000);

  test('a result naming an unknown part: exit 1 naming it, and no manifold-3d run it could not place', () => {
    const r = check(write('unknown.json', JSON.stringify({ format: 'pack-result/2', placements: [{ id: 'gear', position: [0, 0, 0], size: [1, 1, 1], transform: [1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0] }], unplaced: [] })));
    expect(r.status).toBe(1);
    expect(r.out.problems[0]).toEqual({ field: 'placements[0].id', message: 'must name a part of the instance ("gear" is unknown)' });
    expect(r.out.manifold).toBeNull();
  }, 120_000);

  test('a part given by its size alone (no mesh) is placed by its orientation and position for the second check', () => {
    const mixed = { ...body, parts: [body.parts[0], { id: 'block', size: [10, 10, 10], quantity: 1 }] };
    const file = write('mixed.json', JSON.stringify(mixed));
    const inMemory = shapeInstance([{ id: 'housing', mesh: holder, quantity: 1, orientations: ['upright'] }], 3);
    inMemory.parts.push({ id: 'block', size: [10, 10, 10], quantity: 1, rotations: [0, 1, 2, 3, 4, 5], meshPath: null, mesh: null });
    const layout = (name: string, at: [number, number, number]) =>
      write(name, JSON.stringify(summariseShapeLayout(inMemory, [{ id: 'housing', rotation: 0, position: H }, { id: 'block', rotation: 0, position: at }])));
    const inside = spawnSync('npx', ['tsx', 'scripts/check-layout.ts', file, layout('mixed-good.json', [20 + 2 + 3, 20 + 15, 2 + 3])], { cwd: root, encoding: 'utf8', timeout: 120_000 });
    expect(inside.status).toBe(0);
    const good = JSON.parse(inside.stdout);
    expect(good.manifold.faults).toEqual([]);
    expect(good.manifold.smallestGapMm).toBeCloseTo(3, 4);
    const through = spawnSync('npx', ['tsx', 'scripts/check-layout.ts', file, layout('mixed-wall.json', [20 - 5, 20 + 15, 5])], { cwd: root, encoding: 'utf8', timeout: 120_000 });
    expect(through.status).toBe(1);
    expect(JSON.parse(through.stdout).manifold.faults.join()).toMatch(/placements 0 and 1 share 200\.0\d\d mm\^3/);
  }, 120_000);

  test('no spacing asked: a cube resting on the housing rim and one touching its side are valid by both checks (surfaces may touch); one sunk 0.1 mm into the rim is not', () => {
    const touching = write('touching.json', JSON.stringify({ ...body, spacing: 0, parts: [body.parts[0], { ...body.parts[1], quantity: 2 }] }));
    const inMemory = shapeInstance(
      [
        { id: 'housing', mesh: holder, quantity: 1, orientations: ['upright'] },
        { id: 'cube', mesh: cube, quantity: 2 },
      ],
      0,
    );
    const layout = (name: string, onRim: number) =>
      write(name, JSON.stringify(summariseShapeLayout(inMemory, [{ id: 'housing', rotation: 0, position: H }, { id: 'cube', rotation: 0, position: [20 + 60, 20 + 15, 0] }, { id: 'cube', rotation: 0, position: [20 - 8, 20 + 15, onRim] }])));
    // The rim is 25 mm over the floor: the second cube stands on the wall at x 20 to 22, and over the plate beside it.
    const good = run([touching, layout('rim.json', 25)]);
    expect(good.stderr).toBe('');
    expect(good.status).toBe(0);
    expect(JSON.parse(good.stdout).manifold.faults).toEqual([]);
    const sunk = run([touching, layout('sunk.json', 24.9)]);
    expect(sunk.status).toBe(1);
    expect(JSON.parse(sunk.stdout).manifold.faults.join()).toMatch(/placements 0 and 2 share 2\.0\d\d mm\^3/);
  }, 120_000);

  test('a box instance (pack-instance/1) is checked by the box rules: 2 mm apart passes, 1 mm apart fails', () => {
    const v1 = write('v1.json', JSON.stringify({ format: 'pack-instance/1', chamber: [100, 100, 100], spacing: 2, layerHeight: 0.1, parts: [{ id: 'a', size: [10, 10, 10], quantity: 2 }] }));
    const at = (x: number) => write(`v1-${x}.json`, JSON.stringify({ format: 'pack-result/1', placements: [{ id: 'a', position: [0, 0, 0], size: [10, 10, 10], orientation: 'xyz' }, { id: 'a', position: [x, 0, 0], size: [10, 10, 10], orientation: 'xyz' }], unplaced: [], height: 10, layers: 100, utilization: 0.02 }));
    const apart = run([v1, at(12)]);
    expect(apart.status).toBe(0);
    expect(JSON.parse(apart.stdout)).toEqual({ valid: true, problems: [], manifold: null });
    const close = run([v1, at(11)]);
    expect(close.status).toBe(1);
    expect(JSON.parse(close.stdout).problems).toEqual([{ field: 'placements[1]', message: 'is only 1 mm from placements[0]: the gap must be at least 2 mm along some axis' }]);
  }, 120_000);

  test('input it cannot use exits 2 with one line: a result that is not JSON, a missing mesh file', () => {
    const notJson = run([instanceFile, write('bad.json', '{ nope')]);
    expect(notJson.status).toBe(2);
    expect(notJson.stderr.trimEnd().split('\n')).toHaveLength(1);
    expect(notJson.stderr).toMatch(/^result is not valid JSON/);
    const missing = run([write('missing.json', JSON.stringify({ ...body, parts: [{ id: 'gone', mesh: 'nope.stl', quantity: 1 }] })), write('empty.json', '{"format":"pack-result/2","placements":[],"unplaced":[]}')]);
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/^parts\[0\]\.mesh: cannot read "nope\.stl" \(ENOENT\)/);
  }, 120_000);
});
