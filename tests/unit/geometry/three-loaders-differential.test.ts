/**
 * Differential check of the STL and OBJ readers against three.js's own
 * STLLoader and OBJLoader (three/examples/jsm/loaders), used here as a
 * reference only: both must yield the same triangles, corner by corner, in
 * file order. The loaders are ES modules, so they run in a plain Node child
 * process that prints each file's triangle corners.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { demoLibrary, parseObj, parseStl, writeAsciiStl, writeBinaryStl, type MeshData, type ParseResult } from '../../../shared/geometry';
import { fixture } from './helpers';

const ROOT = path.join(__dirname, '../../..');

const SCRIPT = `
import { STLLoader } from 'three/examples/jsm/loaders/STLLoader.js';
import { OBJLoader } from 'three/examples/jsm/loaders/OBJLoader.js';
import { readFileSync } from 'node:fs';
const files = JSON.parse(readFileSync(0, 'utf8'));
const out = files.map((file) => {
  const bytes = readFileSync(file);
  if (file.endsWith('.stl')) {
    const geometry = new STLLoader().parse(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
    return Array.from(geometry.attributes.position.array);
  }
  const group = new OBJLoader().parse(bytes.toString('utf8'));
  return group.children.flatMap((mesh) => Array.from(mesh.geometry.attributes.position.array));
});
process.stdout.write(JSON.stringify(out));
`;

/** Our triangles as corner coordinates in file order, rounded to float32 as three.js stores them. */
function corners(result: ParseResult): number[] {
  if (!result.ok) throw new Error(result.problems[0].message);
  const { positions, indices }: MeshData = result.parts[0];
  return Array.from(indices, (v) => [positions[v * 3], positions[v * 3 + 1], positions[v * 3 + 2]]).flat().map(Math.fround);
}

/** An OBJ of the mesh whose faces use negative indices and the v//vn corner form. */
function objText(mesh: MeshData): string {
  const lines: string[] = [];
  for (let v = 0; v < mesh.positions.length; v += 3) lines.push(`v ${mesh.positions[v]} ${mesh.positions[v + 1]} ${mesh.positions[v + 2]}`);
  const count = mesh.positions.length / 3;
  for (let f = 0; f < mesh.indices.length; f += 3) {
    const rel = (k: number) => mesh.indices[f + k] - count; // negative: counted back from the last vertex
    lines.push(`f ${rel(0)}//1 ${rel(1)}//1 ${rel(2)}//1`);
  }
  return ['vn 0 0 1', ...lines].join('\n') + '\n';
}

let dir: string;
const cases: { label: string; file: string; ours: number[] }[] = [];
let reference: number[][];

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'three-ref-'));
  const add = (label: string, name: string, bytes: Uint8Array, ours: ParseResult) => {
    const file = path.join(dir, name);
    writeFileSync(file, bytes);
    cases.push({ label, file, ours: corners(ours) });
  };
  add('the ASCII tetrahedron fixture', 'tetra.stl', fixture('tetrahedron-ascii.stl'), parseStl(fixture('tetrahedron-ascii.stl'), { filename: 't.stl' }));
  add('the negative-index cube fixture', 'cube.obj', fixture('cube-negative-indices.obj'), parseObj(fixture('cube-negative-indices.obj'), { filename: 'c.obj' }));
  for (const [i, part] of demoLibrary().entries()) {
    const bin = writeBinaryStl(part.mesh);
    const ascii = writeAsciiStl(part.mesh, 'p');
    const obj = new TextEncoder().encode(objText(part.mesh));
    add(`${part.name} as binary STL`, `p${i}-bin.stl`, bin, parseStl(bin, { filename: 'p.stl' }));
    add(`${part.name} as ASCII STL`, `p${i}-ascii.stl`, ascii, parseStl(ascii, { filename: 'p.stl' }));
    add(`${part.name} as OBJ`, `p${i}.obj`, obj, parseObj(obj, { filename: 'p.obj' }));
  }
  const run = spawnSync(process.execPath, ['--input-type=module', '-e', SCRIPT], {
    cwd: ROOT,
    input: JSON.stringify(cases.map((c) => c.file)),
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024,
  });
  if (run.status !== 0) throw new Error(`three.js loaders failed: ${run.stderr}`);
  reference = JSON.parse(run.stdout);
}, 60_000);

afterAll(() => rmSync(dir, { recursive: true, force: true }));

test('every file gives the same triangles, corner by corner, as three.js STLLoader / OBJLoader', () => {
  expect(reference).toHaveLength(cases.length);
  cases.forEach((c, i) => {
    expect({ label: c.label, triangles: c.ours.length / 9 }).toEqual({ label: c.label, triangles: reference[i].length / 9 });
    const mismatch = c.ours.findIndex((x, k) => Math.abs(x - reference[i][k]) > 1e-6 * Math.max(1, Math.abs(x)));
    expect({ label: c.label, mismatch }).toEqual({ label: c.label, mismatch: -1 });
  });
});
