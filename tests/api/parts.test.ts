// Over 450 lines: the tests of one route family (upload, list, edit, delete, file) sharing one lab fixture.
import { createHash, randomUUID } from 'node:crypto';
import { strToU8, zipSync } from 'fflate';
import { existsSync, mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { addMember, signUp, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { demoMaterials } from '../../shared/demo/profiles';
import { doublingChain3mf, hugeMetres3mf, lyingBomb3mf } from '../helpers/hostile3mf';
import { prism, write3mf, write3mfModelXml, writeAsciiStl, writeBinaryStl, translation, type MeshData } from '../../shared/geometry';

let running: Running;
beforeAll(async () => {
  // A small expansion cap so the ZIP bomb test needs only a few megabytes.
  // Its own temp folder, so the temp-file checks see only this suite's uploads.
  running = await startTestApp({ max3mfExpandedBytes: 8 * 1024 * 1024, uploadTmpDir: mkdtempSync(path.join(tmpdir(), 'sinterstack-parts-test-')) });
});
afterAll(async () => {
  await running.close();
});

const cube = (sizeMm: number): MeshData =>
  prism(
    [
      [0, 0],
      [sizeMm, 0],
      [sizeMm, sizeMm],
      [0, sizeMm],
    ],
    0,
    sizeMm,
  );
const block = (x: number, y: number, z: number): MeshData =>
  prism(
    [
      [0, 0],
      [x, 0],
      [x, y],
      [0, y],
    ],
    0,
    z,
  );

function objText(mesh: MeshData): Uint8Array {
  const lines: string[] = [];
  for (let i = 0; i < mesh.positions.length; i += 3) lines.push(`v ${mesh.positions[i]} ${mesh.positions[i + 1]} ${mesh.positions[i + 2]}`);
  for (let f = 0; f < mesh.indices.length; f += 3) lines.push(`f ${mesh.indices[f] + 1} ${mesh.indices[f + 1] + 1} ${mesh.indices[f + 2] + 1}`);
  return strToU8(lines.join('\n') + '\n');
}

const buf = (u: Uint8Array) => Buffer.from(u.buffer, u.byteOffset, u.byteLength);

/** A binary STL no other upload shares (a random header), so file counts are the test's own. */
const uniqueStl = (mesh: MeshData) => writeBinaryStl(mesh, `test ${randomUUID()}`);

/** Collects a response body as bytes whatever its content type. */
const asBytes = (res: unknown, cb: (err: Error | null, body: Buffer) => void) => {
  const r = res as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  r.on('data', (c: Buffer) => chunks.push(c));
  r.on('end', () => cb(null, Buffer.concat(chunks)));
};

/** Parts in the lab, and stored files holding any of `files`: other suites share the database, so count only this test's own. */
async function counts(labId: string, files: Uint8Array[] = []) {
  const keys = files.map((f) => createHash('sha256').update(f).digest('hex'));
  const [[row]] = (await running.db.sequelize.query(
    'SELECT (SELECT count(*) FROM parts WHERE lab_id = $1)::int AS parts, (SELECT count(*) FROM files WHERE key = ANY($2::text[]))::int AS files',
    { bind: [labId, keys] },
  )) as [{ parts: number; files: number }[], unknown];
  return row;
}

/** A binary STL whose first vertex coordinate is NaN. */
function stlWithNaN(): Uint8Array {
  const bytes = writeBinaryStl(cube(10)).slice();
  new DataView(bytes.buffer).setFloat32(84 + 12, Number.NaN, true);
  return bytes;
}

const RELS = `<?xml version="1.0" encoding="UTF-8"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">
  <Relationship Id="rel0" Target="/3D/3dmodel.model" Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/>
</Relationships>
`;

function threeMfWithUnit(unit: string): Uint8Array {
  const m = cube(10);
  const xml = write3mfModelXml([{ name: 'cube', positions: m.positions, indices: m.indices }], [{ objectIndex: 0, transform: translation(0, 0, 0) }]).replace(
    'unit="millimeter"',
    `unit="${unit}"`,
  );
  return zipSync({ '_rels/.rels': strToU8(RELS), '3D/3dmodel.model': strToU8(xml) });
}

function zipBomb(): Uint8Array {
  // 16 MB of spaces after a valid model compresses to a few kilobytes.
  const m = cube(10);
  const xml = strToU8(write3mfModelXml([{ name: 'cube', positions: m.positions, indices: m.indices }], [{ objectIndex: 0, transform: translation(0, 0, 0) }]));
  const model = new Uint8Array(16 * 1024 * 1024).fill(0x20);
  model.set(xml);
  return zipSync({ '_rels/.rels': strToU8(RELS), '3D/3dmodel.model': model }, { level: 9 });
}

describe('uploading parts', () => {
  test('a designer uploads a binary STL and gets its measured size, volume and area back', async () => {
    const { agent, labId } = await signUp(running, 'stl');
    const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(writeBinaryStl(block(20, 10, 5))), 'plate.stl');
    expect(res.status).toBe(201);
    expect(res.body.rejected).toEqual([]);
    expect(res.body.parts).toHaveLength(1);
    const part = res.body.parts[0];
    // A 20 x 10 x 5 mm box: V = 1000 mm³, A = 2(200 + 100 + 50) = 700 mm² (elementary geometry).
    expect(part).toMatchObject({ name: 'plate', triangles: 12, watertight: true, warnings: [] });
    expect(part.sizeMm[0]).toBeCloseTo(20, 5);
    expect(part.sizeMm[1]).toBeCloseTo(10, 5);
    expect(part.sizeMm[2]).toBeCloseTo(5, 5);
    expect(part.volumeMm3).toBeCloseTo(1000, 3);
    expect(part.areaMm2).toBeCloseTo(700, 3);
    expect(part.file).toMatchObject({ name: 'plate.stl', format: 'stl', unit: 'mm', partIndex: 0 });
    const again = await agent.get(`/api/labs/${labId}/parts/${part.id}`);
    expect(again.status).toBe(200);
    expect(again.body.volumeMm3).toBeCloseTo(1000, 3);
  });

  test('a file name outside ASCII is kept as the designer wrote it (UTF-8), in the part and in the download', async () => {
    const { agent, labId } = await signUp(running, 'utf8name');
    const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(uniqueStl(cube(12))), 'Halterung_ø12.stl');
    expect(res.status).toBe(201);
    const part = res.body.parts[0];
    expect(part.name).toBe('Halterung_ø12');
    expect(part.file.name).toBe('Halterung_ø12.stl');
    const file = await agent.get(`/api/labs/${labId}/parts/${part.id}/file`).buffer(true).parse(asBytes);
    // RFC 6266 / RFC 8187: the UTF-8 name travels percent-encoded in filename*.
    expect(file.headers['content-disposition']).toContain("filename*=UTF-8''Halterung_%C3%B812.stl");
  });

  test('an STL in inches is scaled to millimetres (1 in = 25.4 mm, NIST SP 811)', async () => {
    const { agent, labId } = await signUp(running, 'inch');
    const res = await agent.post(`/api/labs/${labId}/parts`).field('unit', 'inch').attach('file', buf(writeAsciiStl(cube(1))), 'inch-cube.stl');
    expect(res.status).toBe(201);
    const part = res.body.parts[0];
    expect(part.sizeMm[0]).toBeCloseTo(25.4, 4);
    expect(part.volumeMm3).toBeCloseTo(25.4 ** 3, 1);
    expect(part.file.unit).toBe('inch');
  });

  test('an OBJ and a 3MF with two build items give three parts; the 3MF may also be merged into one', async () => {
    const { agent, labId } = await signUp(running, 'objmf');
    const two = write3mf(
      [
        { name: 'small', ...cube(10) },
        { name: 'large', ...cube(20) },
      ],
      [
        { objectIndex: 0, transform: translation(0, 0, 0) },
        { objectIndex: 1, transform: translation(50, 0, 0) },
      ],
    );
    const res = await agent
      .post(`/api/labs/${labId}/parts`)
      .attach('file', buf(objText(cube(10))), 'cube.obj')
      .attach('file', buf(two), 'pair.3mf');
    expect(res.status).toBe(201);
    expect(res.body.parts.map((p: { name: string }) => p.name).sort()).toEqual(['cube', 'large', 'small']);
    const large = res.body.parts.find((p: { name: string }) => p.name === 'large');
    expect(large.volumeMm3).toBeCloseTo(8000, 3);
    expect(large.file).toMatchObject({ format: '3mf', split: true, partIndex: 1 });

    const merged = await agent.post(`/api/labs/${labId}/parts`).field('split', 'false').attach('file', buf(two), 'pair.3mf');
    expect(merged.status).toBe(201);
    expect(merged.body.parts).toHaveLength(1);
    expect(merged.body.parts[0].volumeMm3).toBeCloseTo(9000, 3);
  });

  test("a 3MF's own unit wins over the unit field", async () => {
    const { agent, labId } = await signUp(running, 'mfunit');
    const res = await agent.post(`/api/labs/${labId}/parts`).field('unit', 'inch').attach('file', buf(threeMfWithUnit('centimeter')), 'cm.3mf');
    expect(res.status).toBe(201);
    // 10 units of centimetres = 100 mm (3MF Core §3.4.1 unit table).
    expect(res.body.parts[0].sizeMm[0]).toBeCloseTo(100, 4);
  });

  test('an open mesh is stored with a warning, not refused', async () => {
    const { agent, labId } = await signUp(running, 'open');
    const m = cube(10);
    const open = { positions: m.positions, indices: m.indices.slice(3) };
    const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(writeBinaryStl(open)), 'open.stl');
    expect(res.status).toBe(201);
    expect(res.body.parts[0].watertight).toBe(false);
    expect(res.body.parts[0].warnings.map((w: { code: string }) => w.code)).toContain('not-watertight');
  });

  const badFiles: [string, string, () => Uint8Array, string][] = [
    ['an empty file', 'empty.stl', () => new Uint8Array(0), 'empty-file'],
    ['a binary STL whose size is not 84 + 50 n', 'cut.stl', () => writeBinaryStl(cube(10)).slice(0, 84 + 50 * 3 + 7), 'stl'],
    ['a binary STL whose facet count disagrees with its size', 'count.stl', () => {
      const b = writeBinaryStl(cube(10)).slice();
      new DataView(b.buffer).setUint32(80, 11, true);
      return b;
    }, 'stl'],
    ['an STL with NaN coordinates', 'nan.stl', stlWithNaN, 'non-finite-coordinate'],
    ['an OBJ face pointing to a missing vertex', 'missing.obj', () => strToU8('v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 9\n'), 'obj-missing-vertex'],
    ['a 3MF that is not a ZIP', 'text.3mf', () => strToU8('solid this is not a zip at all'), '3mf-not-zip'],
    ['a 3MF without a model', 'nomodel.3mf', () => zipSync({ '_rels/.rels': strToU8(RELS), 'readme.txt': strToU8('hello') }), '3mf-no-model'],
    ['a 3MF with an unknown unit', 'furlong.3mf', () => threeMfWithUnit('furlong'), '3mf-unknown-unit'],
    ['a 3MF that expands past the limit (ZIP bomb)', 'bomb.3mf', zipBomb, '3mf-too-large'],
    ['a 3MF whose headers declare 4 kB but inflate to 16 MB', 'liar.3mf', () => lyingBomb3mf(16 * 1024 * 1024), '3mf-too-large'],
    ['a kilobyte 3MF whose objects each hold the next twice, 16 levels deep (786,432 triangles)', 'chain.3mf', () => doublingChain3mf(16), 'too-many-triangles'],
    ['a 3MF in metres with a coordinate of 1e306', 'metres.3mf', hugeMetres3mf, 'non-finite-coordinate'],
    ['a file with a wrong extension', 'drawing.dxf', () => uniqueStl(cube(10)), 'unsupported-extension'],
    ['a flat mesh with zero volume', 'flat.stl', () => writeBinaryStl(block(10, 10, 0)), 'zero-volume'],
  ];
  test.each(badFiles)('when %s is uploaded it is refused with 400 naming the file, and nothing is stored', async (_what, name, make, code) => {
    const { agent, labId } = await signUp(running, 'bad');
    const bytes = make();
    const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(bytes), name);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_file');
    expect(res.body.error.message).toContain(`"${name}"`);
    expect(res.body.error.rejected).toHaveLength(1);
    expect(res.body.error.rejected[0].file).toBe(name);
    expect(res.body.error.rejected[0].code.startsWith(code)).toBe(true);
    expect(await counts(labId, [bytes])).toEqual({ parts: 0, files: 0 });
  });

  test('a mix of good and bad files stores the good ones and lists the bad ones as rejected', async () => {
    const { agent, labId } = await signUp(running, 'mixed');
    const res = await agent
      .post(`/api/labs/${labId}/parts`)
      .attach('file', buf(writeBinaryStl(cube(12))), 'good.stl')
      .attach('file', buf(new Uint8Array(0)), 'empty.obj')
      .attach('file', buf(objText(cube(8))), 'good.obj');
    expect(res.status).toBe(201);
    expect(res.body.parts.map((p: { name: string }) => p.name).sort()).toEqual(['good', 'good']);
    expect(res.body.rejected).toEqual([{ file: 'empty.obj', code: 'empty-file', message: expect.stringContaining('"empty.obj"') }]);
    const list = await agent.get(`/api/labs/${labId}/parts`);
    expect(list.body.total).toBe(2);
  });

  test('the same file uploaded twice is stored once and survives deleting one of its parts', async () => {
    const { agent, labId } = await signUp(running, 'dup');
    // Bytes no other test uploads, so the count is this test's own.
    const bytes = buf(uniqueStl(block(13.25, 7.5, 3.125)));
    const first = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'dup-a.stl');
    const second = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'dup-b.stl');
    expect(first.status).toBe(201);
    expect(second.status).toBe(201);
    expect(second.body.parts[0].file.sha256).toBe(first.body.parts[0].file.sha256);
    expect(await counts(labId, [bytes])).toEqual({ parts: 2, files: 1 });

    expect((await agent.delete(`/api/labs/${labId}/parts/${first.body.parts[0].id}`)).status).toBe(204);
    expect(await counts(labId, [bytes])).toEqual({ parts: 1, files: 1 });
    const file = await agent.get(`/api/labs/${labId}/parts/${second.body.parts[0].id}/file`).buffer(true).parse(asBytes);
    expect(file.status).toBe(200);
    expect(Buffer.compare(file.body as Buffer, bytes)).toBe(0);

    expect((await agent.delete(`/api/labs/${labId}/parts/${second.body.parts[0].id}`)).status).toBe(204);
    expect(await counts(labId, [bytes])).toEqual({ parts: 0, files: 0 });
  });

  test('the stored file comes back byte for byte with a mesh content type and its name', async () => {
    const { agent, labId } = await signUp(running, 'download');
    const bytes = buf(objText(block(3, 4, 5)));
    const up = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'small box.obj');
    const res = await agent.get(`/api/labs/${labId}/parts/${up.body.parts[0].id}/file`).buffer(true).parse(asBytes);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^model\/obj/);
    expect(res.headers['content-disposition']).toContain('small box.obj');
    expect(Buffer.compare(res.body as Buffer, bytes)).toBe(0);
    // The file never changes under its SHA-256, so a viewer that has it already is told so.
    expect(res.headers.etag).toBe(`"${createHash('sha256').update(bytes).digest('hex')}"`);
    const cached = await agent.get(`/api/labs/${labId}/parts/${up.body.parts[0].id}/file`).set('If-None-Match', res.headers.etag);
    expect(cached.status).toBe(304);
  });

  test('a file over the upload limit is refused with 413 naming the file, and the temp file is gone', async () => {
    const small = await startTestApp({ uploadLimitBytes: 1000, uploadTmpDir: mkdtempSync(path.join(tmpdir(), 'sinterstack-limit-test-')) });
    try {
      const { agent, labId } = await signUp(small, 'limit');
      const wedge = writeBinaryStl(prism([[0, 0], [10, 0], [5, 8]], 0, 1));
      expect(wedge.length).toBeLessThan(1000);
      const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(wedge), 'wedge.stl').attach('file', Buffer.alloc(5000), 'huge.stl');
      expect(res.status).toBe(413);
      expect(res.body.error).toMatchObject({ code: 'file_too_large', field: 'file' });
      expect(res.body.error.message).toContain('"huge.stl"');
      expect(readdirSync(small.config.uploadTmpDir)).toEqual([]);
    } finally {
      await small.close();
    }
  });

  test('a request without files, or with an unknown unit, answers 400 naming the field', async () => {
    const { agent, labId } = await signUp(running, 'nofile');
    const none = await agent.post(`/api/labs/${labId}/parts`).field('unit', 'mm');
    expect(none.status).toBe(400);
    expect(none.body.error.field).toBe('file');
    const unit = await agent.post(`/api/labs/${labId}/parts`).field('unit', 'furlong').attach('file', buf(writeBinaryStl(cube(10))), 'a.stl');
    expect(unit.status).toBe(400);
    expect(unit.body.error.field).toBe('unit');
    const wrongField = await agent.post(`/api/labs/${labId}/parts`).attach('mesh', buf(writeBinaryStl(cube(10))), 'a.stl');
    expect(wrongField.status).toBe(400);
    expect(wrongField.body.error.message).toContain('"file"');
    const extra = await agent.post(`/api/labs/${labId}/parts`).field('colour', 'red').attach('file', buf(writeBinaryStl(cube(10))), 'a.stl');
    expect(extra.status).toBe(400);
    expect(extra.body.error.field).toBe('colour');
    expect((await agent.get(`/api/labs/${labId}/parts`)).body.total).toBe(0);
  });

  test('upload temp files are removed after every request', async () => {
    const dir = running.config.uploadTmpDir;
    const { agent, labId } = await signUp(running, 'tmp');
    await agent
      .post(`/api/labs/${labId}/parts`)
      .attach('file', buf(writeBinaryStl(cube(9))), 'ok.stl')
      .attach('file', buf(strToU8('nope')), 'bad.3mf');
    expect(existsSync(dir) ? readdirSync(dir) : []).toEqual([]);
  });
});

describe('the storage transaction', () => {
  test('when writing the part row fails after the file row, neither is kept', async () => {
    const { agent, labId } = await signUp(running, 'txn');
    const bytes = uniqueStl(block(11, 12, 13.5));
    const create = jest.spyOn(running.db.models.Part, 'create').mockRejectedValueOnce(new Error('disk full (injected)'));
    try {
      const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(bytes), 'fails.stl');
      expect(res.status).toBe(500);
      expect(create).toHaveBeenCalledTimes(1);
    } finally {
      create.mockRestore();
    }
    expect(await counts(labId, [bytes])).toEqual({ parts: 0, files: 0 });
  });

  test('when one file of several fails to save, the others are kept and it is listed as not saved', async () => {
    const { agent, labId } = await signUp(running, 'txn2');
    const first = uniqueStl(block(11, 12, 14.5));
    const second = uniqueStl(block(11, 12, 15.5));
    const create = jest.spyOn(running.db.models.Part, 'create').mockRejectedValueOnce(new Error('injected'));
    try {
      const res = await agent
        .post(`/api/labs/${labId}/parts`)
        .attach('file', buf(first), 'first.stl')
        .attach('file', buf(second), 'second.stl');
      expect(res.status).toBe(201);
      expect(res.body.parts).toHaveLength(1);
      expect(res.body.rejected).toEqual([{ file: expect.any(String), code: 'not_saved', message: expect.stringContaining('could not be saved') }]);
    } finally {
      create.mockRestore();
    }
    expect(await counts(labId, [first, second])).toEqual({ parts: 1, files: 1 });
  });
});

describe('who may do what', () => {
  test('an operator reads the library but may not upload or edit parts (403, nothing written)', async () => {
    const { agent: lead, labId } = await signUp(running, 'perm');
    const op = await addMember(running, lead, labId, ['operator'], 'op');
    const bytes = uniqueStl(cube(10));
    const res = await op.agent.post(`/api/labs/${labId}/parts`).attach('file', buf(bytes), 'a.stl');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    expect(await counts(labId, [bytes])).toEqual({ parts: 0, files: 0 });
    expect((await op.agent.get(`/api/labs/${labId}/parts`)).status).toBe(200);
    const up = await lead.post(`/api/labs/${labId}/parts`).attach('file', buf(uniqueStl(cube(10))), 'b.stl');
    expect((await op.agent.get(`/api/labs/${labId}/parts/${up.body.parts[0].id}`)).status).toBe(200);
    expect((await op.agent.patch(`/api/labs/${labId}/parts/${up.body.parts[0].id}`).send({ name: 'renamed' })).status).toBe(403);
  });

  test('only the uploader or a lead deletes a part', async () => {
    const { agent: lead, labId } = await signUp(running, 'del');
    const d1 = await addMember(running, lead, labId, ['designer'], 'd1');
    const d2 = await addMember(running, lead, labId, ['designer', 'planner'], 'd2');
    const up = await d1.agent.post(`/api/labs/${labId}/parts`).attach('file', buf(writeBinaryStl(cube(7))), 'a.stl').attach('file', buf(writeBinaryStl(cube(6))), 'b.stl');
    const [a, b] = up.body.parts;
    const other = await d2.agent.delete(`/api/labs/${labId}/parts/${a.id}`);
    expect(other.status).toBe(403);
    expect(other.body.error.code).toBe('forbidden');
    expect((await d1.agent.delete(`/api/labs/${labId}/parts/${a.id}`)).status).toBe(204);
    expect((await lead.delete(`/api/labs/${labId}/parts/${b.id}`)).status).toBe(204);
    expect((await lead.get(`/api/labs/${labId}/parts/${b.id}`)).status).toBe(404);
  });

  test("another lab's part is not found, whatever the route", async () => {
    const mine = await signUp(running, 'mine');
    const theirs = await signUp(running, 'theirs');
    const up = await theirs.agent.post(`/api/labs/${theirs.labId}/parts`).attach('file', buf(writeBinaryStl(cube(5))), 'secret.stl');
    const id = up.body.parts[0].id;
    for (const res of [
      await mine.agent.get(`/api/labs/${mine.labId}/parts/${id}`),
      await mine.agent.get(`/api/labs/${mine.labId}/parts/${id}/file`),
      await mine.agent.patch(`/api/labs/${mine.labId}/parts/${id}`).send({ name: 'mine now' }),
      await mine.agent.delete(`/api/labs/${mine.labId}/parts/${id}`),
      await mine.agent.get(`/api/labs/${theirs.labId}/parts/${id}`),
    ]) {
      expect(res.status).toBe(404);
      expect(JSON.stringify(res.body)).not.toContain('secret');
    }
  });
});

describe('editing parts', () => {
  test('a part is renamed, tagged, given a material and an orientation rule, and turned in quarter turns', async () => {
    const { agent, labId } = await signUp(running, 'edit');
    const material = await agent.post(`/api/labs/${labId}/materials`).send({ ...demoMaterials[0], name: 'Grey powder' });
    const up = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(writeBinaryStl(block(30, 20, 10))), 'bar.stl');
    const id = up.body.parts[0].id;
    const res = await agent
      .patch(`/api/labs/${labId}/parts/${id}`)
      .send({ name: 'Bar 30', tags: ['jig', 'jig', 'line 2'], defaultMaterialId: material.body.id, orientation: 'keep_up', rotationDeg: [90, 0, 0] });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ name: 'Bar 30', tags: ['jig', 'line 2'], materialId: material.body.id, materialName: 'Grey powder', orientation: 'keep_up', rotationDeg: [90, 0, 0] });
    // A quarter turn about x swaps the y and z extents.
    expect(res.body.sizeMm.map((v: number) => Math.round(v * 1000) / 1000)).toEqual([30, 10, 20]);
    expect(res.body.uploadedSizeMm.map((v: number) => Math.round(v * 1000) / 1000)).toEqual([30, 20, 10]);
    const turned = await agent.patch(`/api/labs/${labId}/parts/${id}`).send({ rotationDeg: [90, 0, 90] });
    // Then a quarter turn about z swaps x and y: 30 x 10 x 20 becomes 10 x 30 x 20.
    expect(turned.body.sizeMm.map((v: number) => Math.round(v * 1000) / 1000)).toEqual([10, 30, 20]);
    expect(turned.body.volumeMm3).toBeCloseTo(6000, 3);
  });

  test('a rotation other than quarter turns, or a material of another lab, is refused naming the field', async () => {
    const { agent, labId } = await signUp(running, 'edit2');
    const other = await signUp(running, 'edit2other');
    const foreign = await other.agent.post(`/api/labs/${other.labId}/materials`).send({ ...demoMaterials[0], name: 'Theirs' });
    const up = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(writeBinaryStl(cube(10))), 'c.stl');
    const id = up.body.parts[0].id;
    const rot = await agent.patch(`/api/labs/${labId}/parts/${id}`).send({ rotationDeg: [45, 0, 0] });
    expect(rot.status).toBe(400);
    expect(rot.body.error.field).toBe('rotationDeg[0]');
    const mat = await agent.patch(`/api/labs/${labId}/parts/${id}`).send({ defaultMaterialId: foreign.body.id });
    expect(mat.status).toBe(400);
    expect(mat.body.error.field).toBe('defaultMaterialId');
    expect(JSON.stringify(mat.body)).not.toContain('Theirs');
    const orient = await agent.patch(`/api/labs/${labId}/parts/${id}`).send({ orientation: 'sideways' });
    expect(orient.body.error.field).toBe('orientation');
  });
});

describe('the part library', () => {
  test('searches by name and tag, sorts by a column, filters by material and warnings, and pages', async () => {
    const { agent, labId } = await signUp(running, 'library');
    const material = await agent.post(`/api/labs/${labId}/materials`).send({ ...demoMaterials[0], name: 'White' });
    const sizes = [5, 9, 7, 11, 6];
    const up = await agent.post(`/api/labs/${labId}/parts`).attach('file', buf(writeBinaryStl(cube(sizes[0]))), 'Alpha clip.stl')
      .attach('file', buf(writeBinaryStl(cube(sizes[1]))), 'Beta bracket.stl')
      .attach('file', buf(writeBinaryStl(cube(sizes[2]))), 'Gamma clip.stl')
      .attach('file', buf(writeBinaryStl(cube(sizes[3]))), 'Delta gear.stl')
      .attach('file', buf(writeBinaryStl({ positions: cube(sizes[4]).positions, indices: cube(sizes[4]).indices.slice(3) })), 'Epsilon open.stl');
    expect(up.status).toBe(201);
    const byName = Object.fromEntries(up.body.parts.map((p: { name: string; id: string }) => [p.name, p.id]));
    await agent.patch(`/api/labs/${labId}/parts/${byName['Delta gear']}`).send({ tags: ['drive train'], defaultMaterialId: material.body.id });

    const names = (res: { body: { items: { name: string }[] } }) => res.body.items.map((p) => p.name);
    const clips = await agent.get(`/api/labs/${labId}/parts`).query({ search: 'CLIP', sort: 'name' });
    expect(names(clips)).toEqual(['Alpha clip', 'Gamma clip']);
    expect(clips.body.total).toBe(2);
    expect(names(await agent.get(`/api/labs/${labId}/parts`).query({ search: 'drive' }))).toEqual(['Delta gear']);

    const bigFirst = await agent.get(`/api/labs/${labId}/parts`).query({ sort: '-volume' });
    expect(names(bigFirst)).toEqual(['Delta gear', 'Beta bracket', 'Gamma clip', 'Epsilon open', 'Alpha clip']);
    const page2 = await agent.get(`/api/labs/${labId}/parts`).query({ sort: 'name', page: 2, pageSize: 2 });
    expect(page2.body.total).toBe(5);
    expect(names(page2)).toEqual(['Delta gear', 'Epsilon open']);
    expect(names(await agent.get(`/api/labs/${labId}/parts`).query({ materialId: material.body.id }))).toEqual(['Delta gear']);
    expect(names(await agent.get(`/api/labs/${labId}/parts`).query({ warnings: 'not-watertight' }))).toEqual(['Epsilon open']);
    expect((await agent.get(`/api/labs/${labId}/parts`).query({ warnings: 'none' })).body.total).toBe(4);

    const item = bigFirst.body.items[0];
    expect(item).toMatchObject({ materialName: 'White', timesUsed: 0, uploadedBy: { name: 'Test library' }, tags: ['drive train'] });
    expect(typeof item.createdAt).toBe('string');

    const bad = await agent.get(`/api/labs/${labId}/parts`).query({ sort: 'colour' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('sort');
    const bigPage = await agent.get(`/api/labs/${labId}/parts`).query({ pageSize: 1000 });
    expect(bigPage.body.error.field).toBe('pageSize');
  });
});
