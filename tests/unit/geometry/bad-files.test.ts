import { strToU8, zipSync } from 'fflate';
import { measureMeshFile, writeBinaryStl, write3mf, translation, type ProblemCode } from '../../../shared/geometry';
import { box, handWrittenBinaryStl, tetrahedron } from './helpers';

const enc = (s: string) => new TextEncoder().encode(s);
const CORE = 'http://schemas.microsoft.com/3dmanufacturing/core/2015/02';
const RELS =
  '<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
  '<Relationship Id="r" Target="/3D/3dmodel.model" Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/></Relationships>';

function refusal(bytes: Uint8Array, filename: string, unit?: 'mm' | 'cm' | 'inch') {
  const result = measureMeshFile(bytes, { filename, unit });
  if (result.ok) throw new Error(`${filename} was accepted`);
  expect(result.problems.length).toBeGreaterThan(0);
  const [problem] = result.problems;
  // every message names the file it is about
  expect(problem.message).toContain(`"${filename}"`);
  return problem.code;
}

function package3mf(model: string): Uint8Array {
  return zipSync({ '_rels/.rels': strToU8(RELS), '3D/3dmodel.model': strToU8(model) });
}

const tetraXml = (unit = 'millimeter', extra = '') =>
  `<model unit="${unit}" xmlns="${CORE}"><resources><object id="1"><mesh><vertices>` +
  '<vertex x="0" y="0" z="0"/><vertex x="1" y="0" z="0"/><vertex x="0" y="1" z="0"/><vertex x="0" y="0" z="1"/>' +
  `</vertices><triangles><triangle v1="0" v2="2" v3="1"/><triangle v1="0" v2="1" v3="3"/><triangle v1="0" v2="3" v3="2"/><triangle v1="1" v2="2" v3="3"/>${extra}` +
  '</triangles></mesh></object></resources><build><item objectid="1"/></build></model>';

describe('files that are refused, each with a message naming the file', () => {
  const cases: [string, () => [Uint8Array, string], ProblemCode][] = [
    ['an empty STL', () => [new Uint8Array(0), 'empty.stl'], 'empty-file'],
    ['an empty OBJ', () => [new Uint8Array(0), 'empty.obj'], 'empty-file'],
    ['an empty 3MF', () => [new Uint8Array(0), 'empty.3mf'], 'empty-file'],
    ['a file with another extension', () => [writeBinaryStl(box()), 'bracket.step'], 'unsupported-extension'],
    ['a file without an extension', () => [writeBinaryStl(box()), 'bracket'], 'unsupported-extension'],
    ['a binary STL shorter than its header', () => [new Uint8Array(40), 'short.stl'], 'stl-truncated'],
    // StereoLithography Interface Specification (1989): size = 84 + 50 n
    ['a binary STL whose size is not 84 + 50 n', () => [writeBinaryStl(box()).subarray(0, 84 + 50 * 12 - 7), 'cut.stl'], 'stl-size-not-facets'],
    [
      'a binary STL whose facet count disagrees with its size',
      () => {
        const bytes = writeBinaryStl(box());
        new DataView(bytes.buffer).setUint32(80, 13, true);
        return [bytes, 'count.stl'];
      },
      'stl-facet-count-mismatch',
    ],
    [
      'a binary STL with a NaN coordinate',
      () => {
        const bytes = handWrittenBinaryStl(box());
        new DataView(bytes.buffer).setFloat32(84 + 50 * 3 + 16, NaN, true);
        return [bytes, 'nan.stl'];
      },
      'non-finite-coordinate',
    ],
    [
      'a binary STL with an infinite coordinate',
      () => {
        const bytes = handWrittenBinaryStl(box());
        new DataView(bytes.buffer).setFloat32(84 + 12, -Infinity, true);
        return [bytes, 'inf.stl'];
      },
      'non-finite-coordinate',
    ],
    [
      'a truncated binary STL whose header starts with "solid" (common practice: binary headers often do)',
      () => [handWrittenBinaryStl(box(), 'solid part').subarray(0, 84 + 50 * 12 - 20), 'solid-header.stl'],
      'stl-size-not-facets',
    ],
    ['an ASCII STL vertex with two numbers', () => [enc('solid a\nfacet normal 0 0 0\nouter loop\nvertex 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid a\n'), 'short-vertex.stl'], 'stl-ascii-syntax'],
    ['an ASCII STL with an unknown keyword', () => [enc('solid a\nfacet normal 0 0 0\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\ncolor red\nendsolid a\n'), 'keyword.stl'], 'stl-ascii-syntax'],
    ['an ASCII STL with a NaN coordinate', () => [enc('solid a\nfacet normal 0 0 0\nouter loop\nvertex 0 0 nan\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid a\n'), 'nan-ascii.stl'], 'non-finite-coordinate'],
    ['an ASCII STL with a facet of two vertices', () => [enc('solid a\nfacet normal 0 0 0\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nendloop\nendfacet\nendsolid a\n'), 'two.stl'], 'stl-ascii-syntax'],
    ['an ASCII STL cut off inside a facet', () => [enc('solid a\nfacet normal 0 0 0\nouter loop\nvertex 0 0 0\nvertex 1 0 0\n'), 'cut-ascii.stl'], 'stl-ascii-syntax'],
    ['an ASCII STL with no facets', () => [enc('solid a\nendsolid a\n'), 'nothing.stl'], 'no-triangles'],
    ['a binary STL with no facets', () => [writeBinaryStl({ positions: new Float64Array(0), indices: new Uint32Array(0) }), 'zero.stl'], 'no-triangles'],
    ['an OBJ face pointing past the last vertex', () => [enc('v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 4\n'), 'missing.obj'], 'obj-missing-vertex'],
    ['an OBJ face counting back before the first vertex', () => [enc('v 0 0 0\nv 1 0 0\nv 0 1 0\nf -1 -2 -4\n'), 'back.obj'], 'obj-missing-vertex'],
    ['an OBJ face using a vertex defined after it', () => [enc('v 0 0 0\nv 1 0 0\nf 1 2 3\nv 0 1 0\n'), 'later.obj'], 'obj-missing-vertex'],
    ['an OBJ with an infinite coordinate', () => [enc('v 0 0 inf\nv 1 0 0\nv 0 1 0\nf 1 2 3\n'), 'inf.obj'], 'non-finite-coordinate'],
    ['an OBJ with a word for a coordinate', () => [enc('v 0 0 zero\n'), 'word.obj'], 'obj-syntax'],
    ['an OBJ without faces', () => [enc('v 0 0 0\nv 1 0 0\nv 0 1 0\n'), 'points.obj'], 'no-triangles'],
    ['a 3MF that is not a ZIP', () => [enc('<model>not zipped</model>'), 'plain.3mf'], '3mf-not-zip'],
    ['a 3MF that is a damaged ZIP', () => [package3mf(tetraXml()).subarray(0, 60), 'damaged.3mf'], '3mf-not-zip'],
    ['a 3MF without its model part', () => [zipSync({ '_rels/.rels': strToU8(RELS), 'readme.txt': strToU8('hi') }), 'nomodel.3mf'], '3mf-no-model'],
    ['a 3MF in an unknown unit', () => [package3mf(tetraXml('furlong')), 'furlong.3mf'], '3mf-unknown-unit'],
    ['a 3MF whose model is not XML', () => [package3mf('<model xmlns="x"><resources></model>'), 'broken.3mf'], '3mf-bad-xml'],
    ['a 3MF outside the core namespace', () => [package3mf(tetraXml().replace(CORE, 'http://example.invalid/other')), 'ns.3mf'], '3mf-bad-model'],
    ['a 3MF triangle pointing to a missing vertex', () => [package3mf(tetraXml('millimeter', '<triangle v1="0" v2="1" v3="9"/>')), 'index.3mf'], '3mf-bad-model'],
    ['a 3MF vertex with a NaN coordinate', () => [package3mf(tetraXml().replace('<vertex x="0" y="0" z="0"/>', '<vertex x="NaN" y="0" z="0"/>')), 'nan.3mf'], 'non-finite-coordinate'],
    ['a 3MF vertex with an infinite coordinate', () => [package3mf(tetraXml().replace('<vertex x="0" y="0" z="0"/>', '<vertex x="-Infinity" y="0" z="0"/>')), 'inf.3mf'], 'non-finite-coordinate'],
    ['a 3MF item referring to a missing object', () => [package3mf(tetraXml().replace('<item objectid="1"/>', '<item objectid="7"/>')), 'ref.3mf'], '3mf-bad-model'],
    [
      'a 3MF object that contains itself',
      () => [package3mf(`<model xmlns="${CORE}"><resources><object id="1"><components><component objectid="1"/></components></object></resources><build><item objectid="1"/></build></model>`), 'loop.3mf'],
      '3mf-bad-model',
    ],
    ['a 3MF with no build items', () => [package3mf(tetraXml().replace('<build><item objectid="1"/></build>', '<build/>')), 'nobuild.3mf'], 'no-triangles'],
    ['a flat sheet (zero volume) in STL', () => [writeBinaryStl({ positions: Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0]), indices: Uint32Array.from([0, 1, 2, 0, 2, 1]) }), 'flat.stl'], 'zero-volume'],
    [
      'a 3MF whose only part is flat',
      () => [write3mf([{ name: 'flat', positions: Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 1, 1, 0]), indices: Uint32Array.from([0, 1, 2, 1, 3, 2]) }], [{ objectIndex: 0, transform: translation(0, 0, 0) }]), 'flat.3mf'],
      'zero-volume',
    ],
  ];

  test.each(cases)('%s is refused', (_label, make, code) => {
    const [bytes, filename] = make();
    expect(refusal(bytes, filename)).toBe(code);
  });

  test('a 3MF that would expand past the limit is refused before it is inflated (ZIP bomb)', () => {
    // 64 MB of one repeated byte compresses to about 64 kB.
    const model = new Uint8Array(64 * 1024 * 1024).fill(0x20);
    model.set(strToU8(tetraXml()));
    const bytes = zipSync({ '_rels/.rels': strToU8(RELS), '3D/3dmodel.model': model }, { level: 9 });
    expect(bytes.length).toBeLessThan(1024 * 1024);
    const result = measureMeshFile(bytes, { filename: 'bomb.3mf', maxUncompressedBytes: 16 * 1024 * 1024 });
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.problems[0].code).toBe('3mf-too-large');
      expect(result.problems[0].message).toContain('"bomb.3mf"');
    }
    // the same package is accepted under limits it fits (its 1000:1 ratio is past the default ratio cap)
    expect(measureMeshFile(bytes, { filename: 'bomb.3mf', maxUncompressedBytes: 128 * 1024 * 1024, maxCompressionRatio: 5000 }).ok).toBe(true);
  });

  test('an open mesh is accepted with a warning, not refused', () => {
    const mesh = box();
    const open = { positions: mesh.positions, indices: mesh.indices.slice(3) };
    const result = measureMeshFile(writeBinaryStl(open), { filename: 'open.stl' });
    expect(result.ok).toBe(true);
    if (result.ok) expect(result.parts[0].warnings.map((w) => w.code)).toContain('not-watertight');
  });

  test('an upload unit other than mm, cm or inch is a programming error of the caller, not a file problem', () => {
    expect(() => measureMeshFile(writeBinaryStl(box()), { filename: 'a.stl', unit: 'm' as never })).toThrow(RangeError);
  });

  test('file names with control characters are cleaned in messages', () => {
    const result = measureMeshFile(new Uint8Array(0), { filename: 'a\u0007b.stl' });
    expect(!result.ok && result.problems[0].message).toBe('"ab.stl" is empty (0 bytes).');
  });

  test('a valid tetrahedron in every format is accepted', () => {
    expect(measureMeshFile(writeBinaryStl(tetrahedron()), { filename: 't.STL' }).ok).toBe(true);
    expect(measureMeshFile(package3mf(tetraXml()), { filename: 't.3MF' }).ok).toBe(true);
    expect(measureMeshFile(enc('v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\nf 1 3 2\nf 1 2 4\nf 1 4 3\nf 2 3 4\n'), { filename: 't.obj' }).ok).toBe(true);
  });
});
