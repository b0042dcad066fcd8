import { PNG } from 'pngjs';
import type { Response } from 'superagent';
import { startTestApp } from '../helpers/app';
import { labWithProfiles, makeRequest } from '../helpers/plans';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

// The PNG's bytes as a Buffer (supertest leaves image bodies unparsed otherwise).
const binary = (res: Response, cb: (err: Error | null, body: Buffer) => void) => {
  const stream = res as unknown as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => cb(null, Buffer.concat(chunks)));
};

test("a part's picture is drawn from its mesh as stored, kept once per file and turn, and private to its lab", async () => {
  const lab = await labWithProfiles(running, 'thumbs');
  const other = await labWithProfiles(running, 'thumbs-other');
  const made = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [{ name: 'Flat bar', sizeMm: [40, 10, 4], quantity: 1 }]);
  const partId = made.lines[0].partId;
  const url = `/api/labs/${lab.labId}/parts/${partId}/thumbnail.png`;

  const first = await lab.agent.get(url).buffer(true).parse(binary);
  expect(first.status).toBe(200);
  expect(first.headers['content-type']).toBe('image/png');
  const picture = PNG.sync.read(first.body as Buffer);
  expect([picture.width, picture.height]).toEqual([128, 128]);
  let opaque = 0;
  for (let i = 3; i < picture.data.length; i += 4) if (picture.data[i] === 255) opaque++;
  expect(opaque).toBeGreaterThan(128 * 128 * 0.05);
  expect(picture.data[3]).toBe(0); // the corner is transparent

  const etag = first.headers.etag as string;
  expect((await lab.agent.get(url).set('If-None-Match', etag)).status).toBe(304);
  const kept = async () => (await running.db.sequelize.query('SELECT count(*)::int AS n FROM part_thumbnails t JOIN parts p ON p.file_key = t.file_key WHERE p.id = $1', { bind: [partId] }))[0][0] as { n: number };
  expect((await kept()).n).toBe(1);

  // Turned a quarter about x: the bar stands up, the picture is another one under another tag.
  expect((await lab.agent.patch(`/api/labs/${lab.labId}/parts/${partId}`).send({ rotationDeg: [90, 0, 0] })).status).toBe(200);
  const turned = await lab.agent.get(url).set('If-None-Match', etag).buffer(true).parse(binary);
  expect(turned.status).toBe(200);
  expect(turned.headers.etag).not.toBe(etag);
  expect(Buffer.compare(turned.body as Buffer, first.body as Buffer)).not.toBe(0);
  expect((await kept()).n).toBe(2);

  expect((await other.agent.get(`/api/labs/${other.labId}/parts/${partId}/thumbnail.png`)).status).toBe(404);
  expect((await other.agent.get(url)).status).toBe(404);
  expect((await lab.agent.get(`/api/labs/${lab.labId}/parts/00000000-0000-0000-0000-000000000000/thumbnail.png`)).status).toBe(404);
});
