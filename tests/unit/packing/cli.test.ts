import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { validateLayout } from '@/shared/packing';
import { instanceOf } from './helpers';

const root = join(__dirname, '..', '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'pack-cli-'));
const run = (args: string[], input?: string) =>
  spawnSync('npx', ['tsx', 'scripts/pack.ts', ...args], { cwd: root, input, encoding: 'utf8', timeout: 60_000 });
const write = (name: string, body: string) => {
  const file = join(dir, name);
  writeFileSync(file, body);
  return file;
};

const good = {
  format: 'pack-instance/1',
  chamber: [300, 300, 380],
  margin: { xy: 8, bottom: 5, top: 5 },
  spacing: 3,
  layerHeight: 0.11,
  objective: 'min-height',
  timeLimitMs: 300,
  seed: 1,
  parts: [
    { id: 'clip-a', size: [24, 12, 8], quantity: 40, orientations: ['xyz', 'yxz'] },
    { id: 'huge', size: [999, 999, 999], quantity: 1 },
  ],
};

describe('pack command line', () => {
  test('a good file prints a valid result and exits 0; an oversized part is unplaced, not an error', () => {
    const r = run([write('good.json', JSON.stringify(good))]);
    expect(r.status).toBe(0);
    const result = JSON.parse(r.stdout);
    expect(result.format).toBe('pack-result/1');
    expect(validateLayout(instanceOf(good), result)).toEqual([]);
    expect(result.unplaced).toEqual([{ id: 'huge', count: 1 }]);
  }, 60_000);

  test('reads standard input with -', () => {
    const r = run(['-'], JSON.stringify(good));
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).placements).toHaveLength(40);
  }, 60_000);

  test.each([
    ['a negative size', { ...good, parts: ['a', 'b', 'c'].map((id) => ({ ...good.parts[0], id })).concat([{ id: 'd', size: [1, -2, 3], quantity: 1, orientations: ['xyz'] }]) }, /^parts\[3\]\.size\[1\] must be a positive number/],
    ['a missing size', { ...good, parts: [{ id: 'a', quantity: 1 }] }, /^parts\[0\]\.size /],
    ['an unknown orientation', { ...good, parts: [{ ...good.parts[0], orientations: ['xyz', 'abc'] }] }, /^parts\[0\]\.orientations\[1\] /],
    ['an unknown objective', { ...good, objective: 'fastest' }, /^objective /],
  ])('%s exits 2 with one line naming the field', (_name, body, message) => {
    const r = run([write('bad.json', JSON.stringify(body))]);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(message);
  }, 60_000);

  test('unreadable JSON exits 2 with one line', () => {
    const r = run([write('broken.json', '{"format": "pack-instance/1", ')]);
    expect(r.status).toBe(2);
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/JSON/);
  }, 60_000);
});
