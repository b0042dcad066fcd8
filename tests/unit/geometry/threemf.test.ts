import { strToU8, zipSync } from 'fflate';
import {
  composeTransforms,
  measureMesh,
  parse3mf,
  read3mfModel,
  write3mf,
  translation,
  MM_PER_3MF_UNIT,
  type ParseResult,
} from '../../../shared/geometry';
import { box, fixture, tetrahedron } from './helpers';

const CONTENT_TYPES =
  '<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
  '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>' +
  '<Default Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/></Types>';

function rels(target: string): string {
  return (
    '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
    `<Relationship Target="${target}" Id="rel0" Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/></Relationships>`
  );
}

/** A package built the way 3MF Core §2 and App. C describe: content types, start-part relationship, model part. */
function pack(modelXml: string | Uint8Array, modelPath = '3D/3dmodel.model'): Uint8Array {
  return zipSync({
    '[Content_Types].xml': strToU8(CONTENT_TYPES),
    '_rels/.rels': strToU8(rels(`/${modelPath}`)),
    [modelPath]: typeof modelXml === 'string' ? strToU8(modelXml) : modelXml,
  });
}

function parts(result: ParseResult) {
  if (!result.ok) throw new Error(result.problems.map((p) => `${p.code}: ${p.message}`).join());
  return result.parts;
}

const CORE = 'http://schemas.microsoft.com/3dmanufacturing/core/2015/02';

function tetraModel(unit: string | null, itemTransform = ''): string {
  const u = unit === null ? '' : ` unit="${unit}"`;
  return (
    `<model${u} xmlns="${CORE}"><resources><object id="1" type="model"><mesh><vertices>` +
    '<vertex x="0" y="0" z="0"/><vertex x="1" y="0" z="0"/><vertex x="0" y="1" z="0"/><vertex x="0" y="0" z="1"/>' +
    '</vertices><triangles><triangle v1="0" v2="2" v3="1"/><triangle v1="0" v2="1" v3="3"/>' +
    '<triangle v1="0" v2="3" v3="2"/><triangle v1="1" v2="2" v3="3"/></triangles></mesh></object></resources>' +
    `<build><item objectid="1"${itemTransform ? ` transform="${itemTransform}"` : ''}/></build></model>`
  );
}

describe('3MF example box (3MF Core Specification, Appendix B.2)', () => {
  const bytes = pack(fixture('3mf-core-example-box.model'));

  test('has 8 vertices and 12 triangles, reached through a component', () => {
    const [part] = parts(parse3mf(bytes, { filename: 'box.3mf' }));
    const m = measureMesh(part);
    expect(m.vertices).toBe(8);
    expect(m.triangles).toBe(12);
    expect(m.watertight && m.oriented).toBe(true);
    expect(m.eulerCharacteristic).toBe(2); // Euler's formula, closed genus-0 mesh
  });

  test('measures 39.998 x 40.000 x 39.998 mm, 63 993.600 16 mm3 and 9 599.360 008 mm2', () => {
    // computed from the specification's example: 39.998^2 x 40 and 2 (39.998^2 + 2 x 39.998 x 40)
    const m = measureMesh(parts(parse3mf(bytes, { filename: 'box.3mf' }))[0]);
    expect(m.sizeMm[0]).toBeCloseTo(39.998, 9);
    expect(m.sizeMm[1]).toBeCloseTo(40.0, 9);
    expect(m.sizeMm[2]).toBeCloseTo(39.998, 9);
    expect(m.volumeMm3).toBeCloseTo(63993.60016, 5);
    expect(m.areaMm2).toBeCloseTo(9599.360008, 5);
  });

  test("the build item's translation places the box around the origin (row vectors, 3MF Core §3.3)", () => {
    const m = measureMesh(parts(parse3mf(bytes, { filename: 'box.3mf' }))[0]);
    expect(m.bboxMinMm[0]).toBeCloseTo(-19.999, 9);
    expect(m.bboxMinMm[1]).toBeCloseTo(-20, 9);
    expect(m.bboxMinMm[2]).toBeCloseTo(0, 9);
    expect(m.bboxMaxMm[0]).toBeCloseTo(19.999, 9);
    expect(m.bboxMaxMm[1]).toBeCloseTo(20, 9);
  });
});

describe('3MF units (3MF Core §3.4)', () => {
  const expected: [string, number][] = [
    ['micron', 0.001],
    ['millimeter', 1],
    ['centimeter', 10],
    ['inch', 25.4],
    ['foot', 304.8],
    ['meter', 1000],
  ];
  test.each(expected)('a model in %s is scaled by %d mm per unit', (unit, mmPerUnit) => {
    expect(MM_PER_3MF_UNIT[unit]).toBe(mmPerUnit);
    const m = measureMesh(parts(parse3mf(pack(tetraModel(unit)), { filename: 't.3mf' }))[0]);
    expect(m.sizeMm[0]).toBeCloseTo(mmPerUnit, 12);
    expect(m.volumeMm3 / (mmPerUnit ** 3 / 6)).toBeCloseTo(1, 12);
  });

  test('without a unit attribute the model is in millimetres', () => {
    expect(measureMesh(parts(parse3mf(pack(tetraModel(null)), { filename: 't.3mf' }))[0]).sizeMm[2]).toBeCloseTo(1, 12);
  });
});

describe('3MF transforms (3MF Core §3.3: p\' = [x y z 1] M)', () => {
  test('a build item transform rotates and translates with row vectors', () => {
    // 90 degrees about z: rows (0 1 0), (-1 0 0), (0 0 1); then translation (10, 20, 30).
    const m = '0 1 0 -1 0 0 0 0 1 10 20 30';
    const [part] = parts(parse3mf(pack(tetraModel('millimeter', m)), { filename: 't.3mf' }));
    // vertex (1,0,0) -> [1 0 0 1] M = (0, 1, 0) + t
    expect(Array.from(part.positions.subarray(3, 6))).toEqual([10, 21, 30]);
    // vertex (0,1,0) -> (-1, 0, 0) + t
    expect(Array.from(part.positions.subarray(6, 9))).toEqual([9, 20, 30]);
    expect(measureMesh(part).volumeMm3).toBeCloseTo(1 / 6, 12);
  });

  test('a mirroring transform keeps the triangles facing outward', () => {
    const [part] = parts(parse3mf(pack(tetraModel('millimeter', '-1 0 0 0 1 0 0 0 1 0 0 0')), { filename: 't.3mf' }));
    const m = measureMesh(part);
    expect(m.volumeMm3).toBeCloseTo(1 / 6, 12);
    expect(m.oriented).toBe(true);
  });

  test('a component transform applies before its parent item transform', () => {
    const a = [2, 0, 0, 0, 2, 0, 0, 0, 2, 1, 0, 0];
    const b = translation(0, 5, 0);
    // point (1,1,1): first a -> (3,2,2), then b -> (3,7,2)
    const c = composeTransforms(a, b);
    expect([1 * c[0] + 1 * c[3] + 1 * c[6] + c[9], 1 * c[1] + 1 * c[4] + 1 * c[7] + c[10], 1 * c[2] + 1 * c[5] + 1 * c[8] + c[11]]).toEqual([3, 7, 2]);
    const xml =
      `<model unit="millimeter" xmlns="${CORE}"><resources>` +
      '<object id="1"><mesh><vertices><vertex x="0" y="0" z="0"/><vertex x="1" y="0" z="0"/><vertex x="0" y="1" z="0"/><vertex x="0" y="0" z="1"/></vertices>' +
      '<triangles><triangle v1="0" v2="2" v3="1"/><triangle v1="0" v2="1" v3="3"/><triangle v1="0" v2="3" v3="2"/><triangle v1="1" v2="2" v3="3"/></triangles></mesh></object>' +
      `<object id="2"><components><component objectid="1" transform="${a.join(' ')}"/></components></object>` +
      `</resources><build><item objectid="2" transform="${b.join(' ')}"/></build></model>`;
    const m = measureMesh(parts(parse3mf(pack(xml), { filename: 'nested.3mf' }))[0]);
    expect(m.bboxMinMm).toEqual([1, 5, 0]);
    expect(m.bboxMaxMm).toEqual([3, 7, 2]);
    expect(m.volumeMm3).toBeCloseTo(8 / 6, 12);
  });
});

describe('3MF packages', () => {
  test('the start part is found through _rels/.rels wherever it lives', () => {
    const bytes = pack(tetraModel('millimeter'), 'models/main part.model');
    expect(parts(parse3mf(bytes, { filename: 't.3mf' }))).toHaveLength(1);
  });

  test('a package whose relationships are missing still opens when the model sits at /3D/3dmodel.model', () => {
    const bytes = zipSync({ '3D/3dmodel.model': strToU8(tetraModel('millimeter')) });
    expect(parts(parse3mf(bytes, { filename: 't.3mf' }))).toHaveLength(1);
  });

  test('relationships pointing to a part that is not in the package leave no model', () => {
    const bytes = zipSync({ '_rels/.rels': strToU8(rels('/3D/elsewhere.model')), 'other.model': strToU8(tetraModel('millimeter')) });
    const result = parse3mf(bytes, { filename: 't.3mf' });
    expect(!result.ok && result.problems[0].code).toBe('3mf-no-model');
    expect(!result.ok && result.problems[0].message).toContain('/3D/elsewhere.model');
  });

  test('several build items become several parts, or one merged part when asked', () => {
    const bytes = write3mf(
      [
        { name: 'Tetra', ...tetrahedron() },
        { name: 'Block', ...box(2, 2, 2) },
      ],
      [
        { objectIndex: 0, transform: translation(0, 0, 0) },
        { objectIndex: 1, transform: translation(10, 0, 0) },
        { objectIndex: 1, transform: translation(20, 0, 0) },
      ],
    );
    const split = parts(parse3mf(bytes, { filename: 'set.3mf', splitObjects: true }));
    expect(split.map((p) => p.name)).toEqual(['Tetra', 'Block', 'Block']);
    expect(split.map((p) => measureMesh(p).volumeMm3).map((v) => +v.toFixed(9))).toEqual([+(1 / 6).toFixed(9), 8, 8]);
    const merged = parts(parse3mf(bytes, { filename: 'set.3mf', splitObjects: false }));
    expect(merged).toHaveLength(1);
    expect(merged[0].name).toBe('set');
    const m = measureMesh(merged[0]);
    expect(m.shells).toBe(3);
    expect(m.volumeMm3).toBeCloseTo(16 + 1 / 6, 9);
  });

  test('support objects are not measured as parts', () => {
    const support = tetraModel('millimeter')
      .replace('type="model"', 'type="support"')
      .replace('<build><item objectid="1"/>', '<build><item objectid="1"/><item objectid="2" transform="1 0 0 0 1 0 0 0 1 5 0 0"/>')
      .replace('</resources>', '<object id="2" type="model"><components><component objectid="1"/></components></object></resources>');
    const found = parts(parse3mf(pack(support), { filename: 's.3mf' }));
    expect(found).toHaveLength(1);
    expect(measureMesh(found[0]).bboxMinMm[0]).toBe(5);
  });

  test('writer to reader round trip keeps objects, items and transforms', () => {
    const objects = [
      { name: 'Tetra <A&B>', ...tetrahedron() },
      { name: 'Block', ...box(1, 2, 3) },
    ];
    const items = [
      { objectIndex: 1, transform: [0, 1, 0, -1, 0, 0, 0, 0, 1, 100.25, 50.5, 0.125] },
      { objectIndex: 0, transform: translation(-3, 4.75, 10) },
      { objectIndex: 1, transform: translation(7, 8, 9) },
    ];
    const read = read3mfModel(write3mf(objects, items, 'millimeter'), { filename: 'build.3mf' });
    if (!read.ok) throw new Error(read.problems[0].message);
    const { model } = read;
    expect(model.unit).toBe('millimeter');
    expect([...model.objects.values()].map((o) => o.name)).toEqual(['Tetra <A&B>', 'Block']);
    expect(model.items).toHaveLength(3);
    model.items.forEach((item, i) => {
      expect(item.transform).toEqual(items[i].transform);
      const object = model.objects.get(item.objectId)!;
      expect(object.name).toBe(objects[items[i].objectIndex].name);
      expect(Array.from(object.positions)).toEqual(Array.from(objects[items[i].objectIndex].positions));
      expect(Array.from(object.indices)).toEqual(Array.from(objects[items[i].objectIndex].indices));
    });
  });

  test('a package written in inches reads back in millimetres', () => {
    const [part] = parts(parse3mf(write3mf([{ name: 'b', ...box(1, 1, 1) }], [{ objectIndex: 0, transform: translation(0, 0, 0) }], 'inch'), { filename: 'b.3mf' }));
    expect(measureMesh(part).volumeMm3).toBeCloseTo(25.4 ** 3, 6);
  });
});
