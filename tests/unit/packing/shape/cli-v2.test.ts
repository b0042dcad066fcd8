import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { housing, parseMeshFile, writeBinaryStl, writeAsciiStl } from '@/shared/geometry';
import { parseInstanceV2, validateShapeLayout, type PackInstanceV2 } from '@/shared/packing';
import { box } from '../../geometry/helpers';

const root = join(__dirname, '..', '..', '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'pack-v2-'));
const run = (args: string[], input?: string) => spawnSync('npx', ['tsx', 'scripts/pack.ts', ...args], { cwd: root, input, encoding: 'utf8', timeout: 120_000 });
const write = (name: string, body: string | Uint8Array) => {
  const file = join(dir, name);
  writeFileSync(file, body);
  return file;
};

// An open-topped housing and small cubes that fit inside it.
const housingMesh = housing({ lengthMm: 60, widthMm: 40, heightMm: 25, wallMm: 2, floorMm: 2, cornerRadiusMm: 4, cornerSegments: 4 });
write('housing.stl', writeBinaryStl(housingMesh));
write('cube.stl', writeAsciiStl(box(8, 8, 8)));
write('huge.stl', writeBinaryStl(box(500, 500, 500)));
// The same housing with a facet written twice and one whose corners are one point: closed all the same.
{
  const ix = housingMesh.indices;
  write('housing-dirty.stl', writeBinaryStl({ positions: housingMesh.positions, indices: Uint32Array.from([...ix, ix[0], ix[1], ix[2], ix[3], ix[4], ix[3]]) }));
}
// A cube with one triangle missing: not watertight.
const open = box(10, 10, 10);
write('open.stl', writeBinaryStl({ positions: open.positions, indices: open.indices.slice(0, 33) }));

const base = {
  format: 'pack-instance/2',
  chamber: [66, 46, 120],
  margin: { xy: 2, bottom: 2, top: 2 },
  spacing: 2,
  layerHeight: 0.2,
  timeLimitMs: 300,
  fit: 'shape',
};

/** The instance as the checker sees it: parsed, meshes attached from the files. */
function withMeshes(body: Record<string, unknown>): PackInstanceV2 {
  const parsed = parseInstanceV2(body);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  for (const part of parsed.instance.parts) {
    if (part.meshPath === null) continue;
    // Read back from the file, as the command line does (binary STL holds 32-bit coordinates).
    const parsed = parseMeshFile(new Uint8Array(readFileSync(join(dir, part.meshPath))), { filename: part.meshPath });
    if (!parsed.ok) throw new Error(parsed.problems[0].message);
    part.mesh = parsed.parts[0];
  }
  return parsed.instance;
}

describe('pack command line, version 2 (meshes)', () => {
  test('a missing mesh file exits 2 with one line naming parts[i].mesh', () => {
    const body = { ...base, parts: [{ id: 'cube', mesh: 'cube.stl', quantity: 1 }, { id: 'gone', mesh: 'nope/missing.stl', quantity: 1 }] };
    const r = run([write('missing.json', JSON.stringify(body))]);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^parts\[1\]\.mesh: cannot read "nope\/missing\.stl" \(ENOENT\)/);
  }, 120_000);

  test('an unreadable mesh file exits 2 naming the part and the reason', () => {
    write('garbage.stl', 'solid x\n facet normal 0 0 1\n outer loop\n vertex 1 2\n');
    const body = { ...base, parts: [{ id: 'bad', mesh: 'garbage.stl', quantity: 1 }] };
    const r = run([write('garbage.json', JSON.stringify(body))]);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/^parts\[0\]\.mesh: /);
  }, 120_000);

  test('by shape: cubes nest inside the housing, the layout passes the independent check, listed in lift-out order', () => {
    // The spec's default limit (2 s): within 300 ms a loaded machine may only get as far as the first layout, the
    // boxes' (cubes stacked on the housing's rim), which the engine rightly returns when the time is up.
    const body = { ...base, timeLimitMs: 2000, parts: [{ id: 'housing', mesh: 'housing.stl', quantity: 1, orientations: ['upright'] }, { id: 'cube', mesh: 'cube.stl', quantity: 6 }, { id: 'huge', mesh: 'huge.stl', quantity: 1 }] };
    const r = run([write('nest.json', JSON.stringify(body))]);
    expect(r.status).toBe(0);
    const result = JSON.parse(r.stdout);
    expect(result.format).toBe('pack-result/2');
    expect(validateShapeLayout(withMeshes(body), result)).toEqual([]);
    expect(result.unplaced).toEqual([{ id: 'huge', count: 1 }]);
    expect(result.placements).toHaveLength(7);
    for (const p of result.placements) expect(p.transform).toHaveLength(12);
    // The housing (60 x 40 x 25) just fits the 62 x 42 usable floor: the cubes can only go inside it, under its rim.
    expect(result.height).toBeLessThanOrEqual(2 + 25 + 1e-6);
    expect(result.areaProfile).toHaveLength(Math.ceil(result.height / 0.2 - 1e-9));
  }, 120_000);

  test('by box: the cubes cannot go inside the housing\'s box, so they stack higher; valid by the same check', () => {
    const body = { ...base, fit: 'box', parts: [{ id: 'housing', mesh: 'housing.stl', quantity: 1, orientations: ['upright'] }, { id: 'cube', mesh: 'cube.stl', quantity: 6 }] };
    const r = run([write('box.json', JSON.stringify(body))]);
    expect(r.status).toBe(0);
    const result = JSON.parse(r.stdout);
    expect(validateShapeLayout(withMeshes(body), result)).toEqual([]);
    expect(result.height).toBeGreaterThan(2 + 25 + 1e-6);
  }, 120_000);

  test('a mesh that is not watertight is packed by its box, with the reason on standard error and in the result', () => {
    const body = { ...base, parts: [{ id: 'open', mesh: 'open.stl', quantity: 2 }] };
    const r = run([write('open.json', JSON.stringify(body))]);
    expect(r.status).toBe(0);
    expect(r.stderr).toMatch(/not watertight/);
    const result = JSON.parse(r.stdout);
    expect(result.warnings).toEqual([expect.objectContaining({ id: 'open', code: 'not-watertight' })]);
    expect(validateShapeLayout(withMeshes(body), result)).toEqual([]);
  }, 120_000);

  test('facets without area or written twice are left out: the housing is closed and the cubes still nest inside it', () => {
    const body = { ...base, timeLimitMs: 2000, parts: [{ id: 'housing', mesh: 'housing-dirty.stl', quantity: 1, orientations: ['upright'] }, { id: 'cube', mesh: 'cube.stl', quantity: 6 }] };
    const r = run([write('dirty.json', JSON.stringify(body))]);
    expect(r.status).toBe(0);
    expect(r.stderr).not.toMatch(/not watertight/);
    const result = JSON.parse(r.stdout);
    expect(result.warnings ?? []).toEqual([]);
    expect(validateShapeLayout(withMeshes(body), result)).toEqual([]);
    expect(result.placements).toHaveLength(7);
    expect(result.height).toBeLessThanOrEqual(2 + 25 + 1e-6);
  }, 120_000);

  test("a size given beside a mesh that is not the mesh's box is named in the warnings, and the mesh's box is packed", () => {
    // An 8 mm cube said to be 8 cm: the kind of unit mix-up a size typed by hand next to a file shows.
    const body = { ...base, parts: [{ id: 'cube', mesh: 'cube.stl', size: [80, 80, 80], quantity: 2 }, { id: 'same', mesh: 'cube.stl', size: [8, 8, 8.00001], quantity: 1 }] };
    const r = run([write('sized.json', JSON.stringify(body))]);
    expect(r.status).toBe(0);
    expect(r.stderr).toMatch(/parts\[0\]\.size \(80 x 80 x 80 mm\) is not the bounding box of its mesh "cube\.stl" \(8 x 8 x 8 mm\)/);
    const result = JSON.parse(r.stdout);
    // Only the first: a size that agrees to rounding is no news.
    expect(result.warnings).toEqual([expect.objectContaining({ id: 'cube', code: 'size-not-mesh' })]);
    expect(result.placements).toHaveLength(3);
    for (const p of result.placements) expect(p.size.map((v: number) => Math.round(v * 1000) / 1000)).toEqual([8, 8, 8]);
  }, 120_000);

  test('from standard input, mesh paths are relative to the current directory', () => {
    const rel = relative(root, join(dir, 'cube.stl'));
    const body = { ...base, parts: [{ id: 'cube', mesh: rel, quantity: 2 }] };
    const r = run(['-'], JSON.stringify(body));
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).placements).toHaveLength(2);
  }, 120_000);

  test('through npm run from another folder: the instance file and, from standard input, the mesh paths are read from that folder', () => {
    // npm runs a package script in the package's root; the caller's folder is the one a user means.
    const npm = (args: string[], input?: string) =>
      spawnSync('npm', ['--prefix', root, 'run', '--silent', 'pack', '--', ...args], { cwd: dir, input, encoding: 'utf8', timeout: 120_000 });
    const body = { ...base, parts: [{ id: 'cube', mesh: 'cube.stl', quantity: 2 }] };
    write('here.json', JSON.stringify(body));
    const fromFile = npm(['here.json']);
    expect(fromFile.stderr).toBe('');
    expect(fromFile.status).toBe(0);
    expect(JSON.parse(fromFile.stdout).placements).toHaveLength(2);
    const fromInput = npm(['-'], JSON.stringify(body));
    expect(fromInput.stderr).toBe('');
    expect(fromInput.status).toBe(0);
    expect(JSON.parse(fromInput.stdout).placements).toHaveLength(2);
  }, 120_000);
});
