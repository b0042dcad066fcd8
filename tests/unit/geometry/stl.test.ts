import { parseStl, measureMesh, isBinaryStlSize, writeBinaryStl, writeAsciiStl } from '../../../shared/geometry';
import { box, fixture, handWrittenBinaryStl, tetrahedron } from './helpers';

function onlyPart(result: ReturnType<typeof parseStl>) {
  if (!result.ok) throw new Error(result.problems.map((p) => p.code).join());
  expect(result.parts).toHaveLength(1);
  return result.parts[0];
}

describe('binary STL', () => {
  // StereoLithography Interface Specification (1989), in Burns, Automated Fabrication (1993) §6.5:
  // 80-byte header, uint32 facet count, 50 bytes a facet, size 84 + 50 n, little-endian.
  test('a file laid out as the 1989 specification describes reads back as its triangles', () => {
    const bytes = handWrittenBinaryStl(tetrahedron(), 'hand written');
    expect(bytes.length).toBe(84 + 50 * 4);
    const part = onlyPart(parseStl(bytes, { filename: 'tetra.stl' }));
    expect(part.indices.length).toBe(12);
    // shared corners are merged: 12 corners, 4 distinct positions
    expect(part.positions.length / 3).toBe(4);
    const m = measureMesh(part);
    expect(m.volumeMm3).toBeCloseTo(1 / 6, 7); // Zhang & Chen, ICIP 2001
    expect(m.watertight).toBe(true);
  });

  test('the size rule 84 + 50 n identifies binary files', () => {
    // StereoLithography Interface Specification (1989)
    expect(isBinaryStlSize(84, 0)).toBe(true);
    expect(isBinaryStlSize(134, 1)).toBe(true);
    expect(isBinaryStlSize(135, 1)).toBe(false);
  });

  test('a binary file whose header starts with "solid" is still read as binary when its size fits its count', () => {
    // common practice: exporters often write "solid" into the binary header
    const bytes = handWrittenBinaryStl(box(2, 3, 4), 'solid exported by a CAD tool');
    const m = measureMesh(onlyPart(parseStl(bytes, { filename: 'box.stl' })));
    expect(m.triangles).toBe(12);
    expect(m.volumeMm3).toBeCloseTo(24, 5);
  });

  test('coordinates in centimetres or inches are converted to millimetres', () => {
    const bytes = handWrittenBinaryStl(box(1, 2, 3));
    expect(measureMesh(onlyPart(parseStl(bytes, { filename: 'a.stl', unit: 'cm' }))).sizeMm).toEqual([10, 20, 30]);
    const inch = measureMesh(onlyPart(parseStl(bytes, { filename: 'a.stl', unit: 'inch' })));
    // 1 inch = 25.4 mm exactly (3MF Core §3.4 uses the same factor)
    expect(inch.sizeMm[0]).toBeCloseTo(25.4, 10);
    expect(inch.volumeMm3).toBeCloseTo(6 * 25.4 ** 3, 4);
  });

  test('-0 and +0 are the same vertex', () => {
    const mesh = tetrahedron();
    const bytes = handWrittenBinaryStl(mesh);
    // Write -0 into the x of the first corner of the second facet (vertex 0 again).
    new DataView(bytes.buffer).setFloat32(84 + 50 + 12, -0, true);
    const part = onlyPart(parseStl(bytes, { filename: 't.stl' }));
    expect(part.positions.length / 3).toBe(4);
    expect(measureMesh(part).watertight).toBe(true);
  });

  test('the binary writer produces the specified layout and reads back unchanged', () => {
    const bytes = writeBinaryStl(box(5, 6, 7), 'solid header that must not stay');
    expect(bytes.length).toBe(84 + 50 * 12);
    expect(new DataView(bytes.buffer).getUint32(80, true)).toBe(12);
    expect(String.fromCharCode(...bytes.subarray(0, 5))).not.toBe('solid');
    // the facet normal is the unit normal of the counter-clockwise corners
    const view = new DataView(bytes.buffer);
    expect([view.getFloat32(84, true), view.getFloat32(88, true), view.getFloat32(92, true)]).toEqual([0, 0, -1]);
    const m = measureMesh(onlyPart(parseStl(bytes, { filename: 'b.stl' })));
    expect(m.volumeMm3).toBeCloseTo(210, 4);
  });
});

describe('ASCII STL', () => {
  test('a solid / facet / outer loop / vertex file is read (StereoLithography Interface Specification, 1989)', () => {
    const part = onlyPart(parseStl(fixture('tetrahedron-ascii.stl'), { filename: 'tetrahedron-ascii.stl' }));
    expect(part.name).toBe('tetrahedron-ascii');
    const m = measureMesh(part);
    expect(m.triangles).toBe(4);
    expect(m.vertices).toBe(4);
    expect(m.volumeMm3).toBeCloseTo(1 / 6, 10); // Zhang & Chen, ICIP 2001
    expect(m.areaMm2).toBeCloseTo(1.5 + Math.sqrt(3) / 2, 7); // elementary
    expect(m.watertight && m.oriented).toBe(true);
  });

  test('keywords in upper case, tabs and CRLF line ends are accepted', () => {
    const text = 'SOLID t\r\n\tFACET NORMAL 0 0 0\r\n OUTER LOOP\r\n VERTEX 0 0 0\r\n VERTEX 1 0 0\r\n VERTEX 0 1 0\r\n ENDLOOP\r\n ENDFACET\r\nENDSOLID t\r\n';
    const part = onlyPart(parseStl(new TextEncoder().encode(text), { filename: 't.stl' }));
    expect(part.indices.length).toBe(3);
  });

  test('the ASCII writer reads back to the same solid', () => {
    const m = measureMesh(onlyPart(parseStl(writeAsciiStl(box(3, 4, 5), 'box'), { filename: 'box.stl' })));
    expect(m.volumeMm3).toBeCloseTo(60, 8);
    expect(m.areaMm2).toBeCloseTo(2 * (12 + 15 + 20), 8);
    expect(m.oriented).toBe(true);
  });
});
