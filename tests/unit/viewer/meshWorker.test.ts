import { bracket, write3mf, writeAsciiStl, writeBinaryStl, translation } from '../../../shared/geometry';
import { parseMeshForView, sniffExtension } from '../../../workers/mesh.worker';

const buffer = (u8: Uint8Array) => u8.buffer.slice(u8.byteOffset, u8.byteOffset + u8.byteLength) as ArrayBuffer;
// A 40 x 30 mm angle bracket, 20 mm wide (extruded along z).
const bracketMesh = () => bracket({ legAMm: 40, legBMm: 30, thicknessMm: 4, widthMm: 20, gussetMm: 6 });

describe('parsing a mesh for the 3D preview', () => {
  it('gives 32-bit positions and the bounding box in millimetres', () => {
    const result = parseMeshForView(buffer(writeBinaryStl(bracketMesh())), 'bracket.stl', 'mm');
    if (!result.ok) throw new Error(JSON.stringify(result.problems));
    expect(result.mesh.positions).toBeInstanceOf(Float32Array);
    expect(result.mesh.indices).toBeInstanceOf(Uint32Array);
    expect(result.mesh.sizeMm[0]).toBeCloseTo(40, 4);
    expect(result.mesh.sizeMm[1]).toBeCloseTo(30, 4);
    expect(result.mesh.sizeMm[2]).toBeCloseTo(20, 4);
    expect(result.mesh.triangles).toBe(bracketMesh().indices.length / 3);
  });

  it('applies the unit chosen for an STL (1 inch = 25.4 mm)', () => {
    const result = parseMeshForView(buffer(writeBinaryStl(bracketMesh())), 'bracket.stl', 'inch');
    if (!result.ok) throw new Error(JSON.stringify(result.problems));
    expect(result.mesh.sizeMm[0]).toBeCloseTo(40 * 25.4, 2);
  });

  it('draws every object of a 3MF, or only the one asked for', () => {
    const mesh = bracketMesh();
    const bytes = write3mf(
      [
        { name: 'left', ...mesh },
        { name: 'right', ...mesh },
      ],
      [
        { objectIndex: 0, transform: translation(0, 0, 0) },
        { objectIndex: 1, transform: translation(100, 0, 0) },
      ],
    );
    const all = parseMeshForView(buffer(bytes), 'pair.3mf', 'mm');
    if (!all.ok) throw new Error(JSON.stringify(all.problems));
    expect(all.mesh.sizeMm[0]).toBeCloseTo(140, 4);
    const one = parseMeshForView(buffer(bytes), 'pair.3mf', 'mm', { partName: all.mesh.partNames[1] });
    if (!one.ok) throw new Error(JSON.stringify(one.problems));
    expect(one.mesh.sizeMm[0]).toBeCloseTo(40, 4);
    expect(one.mesh.bboxMinMm[0]).toBeCloseTo(100, 4);
  });

  it('names every malformed argument of the request', () => {
    const result = parseMeshForView('not bytes', '', 'furlong');
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.problems.map((p) => p.field)).toEqual(['bytes', 'filename', 'unit']);
  });

  it('passes on the reader\u2019s refusal when the file is truncated', () => {
    const bytes = writeBinaryStl(bracketMesh()).slice(0, 200);
    const result = parseMeshForView(buffer(bytes), 'cut.stl', 'mm');
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.problems[0].message).toContain('"cut.stl"');
  });

  it('says which part is missing when the asked-for part is not in the file', () => {
    const result = parseMeshForView(buffer(writeBinaryStl(bracketMesh())), 'bracket.stl', 'mm', { partName: 'lid' });
    expect(result).toMatchObject({ ok: false, problems: [{ code: 'part-not-found', field: 'options.partName' }] });
  });
});

describe('a download without a file extension', () => {
  it('is read by its bytes: binary STL (84 + 50 n bytes), ASCII STL, 3MF (a ZIP) and OBJ', () => {
    expect(sniffExtension(writeBinaryStl(bracketMesh()))).toBe('.stl');
    expect(sniffExtension(writeAsciiStl(bracketMesh()))).toBe('.stl');
    expect(sniffExtension(write3mf([{ name: 'a', ...bracketMesh() }], [{ objectIndex: 0, transform: translation(0, 0, 0) }]))).toBe('.3mf');
    expect(sniffExtension(new TextEncoder().encode('# part\nv 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n'))).toBe('.obj');
    expect(sniffExtension(new TextEncoder().encode('hello'))).toBeNull();
  });

  it('still parses, as the part page fetches /parts/:id/file', () => {
    const result = parseMeshForView(buffer(writeBinaryStl(bracketMesh())), 'file', 'mm');
    if (!result.ok) throw new Error(JSON.stringify(result.problems));
    expect(result.mesh.sizeMm[0]).toBeCloseTo(40, 4);
  });
});
