/**
 * What an upload may expand to: the caps on triangles after a 3MF's
 * components, on inflated bytes and on each entry's compression ratio, and
 * on numbers too large to compute with. Each case is a hostile file that was
 * once accepted.
 */
import { measureMeshFile, parseMeshFile, writeBinaryStl } from '../../../shared/geometry';
import { readZipDirectory } from '../../../shared/geometry/zip';
import { doublingChain3mf, hugeMetres3mf, lyingBomb3mf, package3mf, paddedModel, plateOfCopies3mf } from '../../helpers/hostile3mf';
import { box } from './helpers';

function refusal(bytes: Uint8Array, filename: string, options: Parameters<typeof measureMeshFile>[1] extends infer O ? Partial<O> : never = {}) {
  const result = measureMeshFile(bytes, { filename, ...options });
  if (result.ok) throw new Error(`${filename} was accepted`);
  expect(result.problems[0].message).toContain(`"${filename}"`);
  return result.problems[0];
}

describe('triangles after a 3MF expands its components', () => {
  test('a kilobyte file whose objects each hold the next one twice, 16 levels deep, is refused naming the instance cap', () => {
    const bytes = doublingChain3mf(16);
    expect(bytes.length).toBeLessThan(2048);
    const problem = refusal(bytes, 'chain16.3mf');
    expect(problem.code).toBe('too-many-triangles');
    // 2^17 - 1 objects in the binary tree of copies, 12 triangles × 2^16 leaves = 786,432 (counted, never built)
    expect(problem.message).toContain('131,071 object instances');
    expect(problem.message).toContain('786,432 triangles');
    expect(problem.message).toContain('limit of 10,000 instances');
  });

  test('20 levels (12.6 million triangles) is refused the same way, without building the mesh', () => {
    const problem = refusal(doublingChain3mf(20), 'chain20.3mf');
    expect(problem.code).toBe('too-many-triangles');
    expect(problem.message).toContain('12,582,912 triangles');
  });

  test('a shallow chain within the caps is read, with every copy', () => {
    const parsed = parseMeshFile(doublingChain3mf(3), { filename: 'chain3.3mf' });
    expect(parsed.ok).toBe(true);
    if (parsed.ok) expect(parsed.parts[0].indices.length / 3).toBe(12 * 8);
  });

  test('a plate of 500 component copies is ordinary instancing and is accepted', () => {
    const parsed = parseMeshFile(plateOfCopies3mf(500), { filename: 'plate.3mf' });
    expect(parsed.ok).toBe(true);
    if (parsed.ok) expect(parsed.parts[0].indices.length / 3).toBe(12 * 500);
  });

  test('the triangle cap counts components and names its figure', () => {
    const problem = refusal(plateOfCopies3mf(500), 'plate.3mf', { maxTriangles: 5000 });
    expect(problem.code).toBe('too-many-triangles');
    expect(problem.message).toContain('6,000 triangles, past the limit of 5,000 triangles per file');
  });

  test('the triangle cap stops reading the XML once passed', () => {
    const problem = refusal(plateOfCopies3mf(1), 'one.3mf', { maxTriangles: 10 });
    expect(problem.code).toBe('too-many-triangles');
    expect(problem.message).toContain('more than 10 triangles');
  });

  test('an STL past the triangle cap is refused', () => {
    const problem = refusal(writeBinaryStl(box()), 'box.stl', { maxTriangles: 11 });
    expect(problem.code).toBe('too-many-triangles');
    expect(problem.message).toContain('12 triangles, past the limit of 11');
  });
});

describe('inflated bytes of a 3MF (ZIP bomb)', () => {
  test('an entry that inflates past the size its header declares is stopped and refused', () => {
    // 16 MB of padding declared as 4 kB.
    const bytes = lyingBomb3mf(16 * 1024 * 1024);
    const dir = readZipDirectory(bytes)!;
    expect(dir.find((e) => e.name === '3D/3dmodel.model')!.size).toBe(4096);
    const problem = refusal(bytes, 'liar.3mf');
    expect(problem.code).toBe('3mf-too-large');
    expect(problem.message).toContain('more than the 4 kB its ZIP header declares');
  });

  test('an honest entry past the compression-ratio cap is refused before it is inflated', () => {
    const bytes = package3mf(paddedModel(64 * 1024 * 1024), 9);
    expect(bytes.length).toBeLessThan(1024 * 1024);
    const problem = refusal(bytes, 'padded.3mf');
    expect(problem.code).toBe('3mf-too-large');
    expect(problem.message).toContain('more than 200 times its compressed size');
    // the same package passes where the ratio cap is lifted
    expect(measureMeshFile(bytes, { filename: 'padded.3mf', maxCompressionRatio: 5000 }).ok).toBe(true);
  });

  test('the total inflated bytes are capped across the package', () => {
    const bytes = package3mf(paddedModel(4 * 1024 * 1024), 6);
    const problem = refusal(bytes, 'big.3mf', { maxUncompressedBytes: 1024 * 1024, maxCompressionRatio: 5000 });
    expect(problem.code).toBe('3mf-too-large');
    expect(problem.message).toContain('limit of 1 MB of inflated data');
  });

  test('a package inflated in slices keeps every byte (the model reads the same as stored uncompressed)', () => {
    const model = paddedModel(300_000);
    const a = parseMeshFile(package3mf(model, 9), { filename: 'a.3mf' });
    const b = parseMeshFile(package3mf(model, 0), { filename: 'b.3mf' });
    expect(a.ok && b.ok).toBe(true);
    if (a.ok && b.ok) expect(Array.from(a.parts[0].positions)).toEqual(Array.from(b.parts[0].positions));
  });
});

describe('numbers too large to compute with', () => {
  test('a 3MF in metres with a coordinate of 1e306 is refused (1e309 mm is infinite)', () => {
    const problem = refusal(hugeMetres3mf(), 'metres.3mf');
    expect(problem.code).toBe('non-finite-coordinate');
    expect(problem.message).toContain('unit (meter)');
  });

  test('a 3MF in millimetres whose coordinates are finite but whose area overflows is refused', () => {
    // (1e200)² = 1e400 is past a double's largest value, about 1.8e308 (IEEE 754 binary64).
    const xml = new TextDecoder().decode(paddedModel(0)).replace(/x="10"/g, 'x="1e200"');
    const problem = refusal(package3mf(xml), 'huge.3mf');
    expect(problem.code).toBe('out-of-range');
    expect(problem.message).toContain('size, volume or area cannot be computed');
  });

  test('a binary STL cube with one corner moved to 3e38 (near float32\'s largest) is refused as too large, not as flat', () => {
    const cube = box(10, 10, 10);
    const positions = Float64Array.from(cube.positions);
    positions[0] = 3e38;
    const problem = refusal(writeBinaryStl({ positions, indices: cube.indices }), 'stray.stl');
    expect(problem.code).toBe('out-of-range');
  });
});
