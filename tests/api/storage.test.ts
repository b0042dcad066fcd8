import { HeadObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { signUp, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import type { S3StorageConfig } from '../../server/config';
import { sha256Bytes } from '../../server/storage';
import { prism, writeBinaryStl } from '../../shared/geometry';

// s3rver ships no type declarations, so it is loaded untyped.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const S3rver = require('s3rver');

const BUCKET = 'sinterstack-files';
const stl = (sizeMm: number) => {
  const u = writeBinaryStl(prism([[0, 0], [sizeMm, 0], [sizeMm, sizeMm], [0, sizeMm]], 0, sizeMm), `storage ${randomUUID()}`);
  return Buffer.from(u.buffer, u.byteOffset, u.byteLength);
};
const asBytes = (res: unknown, cb: (err: Error | null, body: Buffer) => void) => {
  const r = res as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  r.on('data', (c: Buffer) => chunks.push(c));
  r.on('end', () => cb(null, Buffer.concat(chunks)));
};

async function rowCounts(running: Running, key: string) {
  const [[row]] = (await running.db.sequelize.query(
    `SELECT (SELECT count(*) FROM parts WHERE file_key = $1)::int AS parts, (SELECT count(*) FROM files WHERE key = $1)::int AS files`,
    { bind: [key] },
  )) as [{ parts: number; files: number }[], unknown];
  return row;
}

describe('the PostgreSQL driver', () => {
  let running: Running;
  beforeAll(async () => {
    running = await startTestApp();
  });
  afterAll(async () => {
    await running.close();
  });

  test('bytes put inside a transaction that then fails are not kept', async () => {
    const bytes = stl(4);
    const key = sha256Bytes(bytes);
    const storage = running.services.storage;
    await expect(
      running.db.sequelize.transaction(async (transaction) => {
        expect(await storage.put(key, { bytes }, { transaction })).toEqual({ created: true });
        throw new Error('a later step fails');
      }),
    ).rejects.toThrow('a later step fails');
    expect(await storage.get(key)).toBeNull();
  });

  test('a file with two references survives dropping one and goes with the second', async () => {
    const bytes = stl(5);
    const key = sha256Bytes(bytes);
    const storage = running.services.storage;
    await running.db.sequelize.transaction((transaction) => storage.put(key, { bytes }, { transaction }));
    const again = await running.db.sequelize.transaction((transaction) => storage.put(key, { bytes }, { transaction }));
    expect(again).toEqual({ created: false });
    await running.db.sequelize.transaction((transaction) => storage.delete(key, { transaction }));
    expect(Buffer.compare((await storage.get(key))!, bytes)).toBe(0);
    await running.db.sequelize.transaction((transaction) => storage.delete(key, { transaction }));
    expect(await storage.get(key)).toBeNull();
  });

  test('a file of several read slices (5 MB and 3 bytes) comes back byte for byte', async () => {
    // Pseudo-random bytes (a linear congruential sequence): every base64 slice boundary meets different bytes.
    const bytes = Buffer.alloc(5 * 1024 * 1024 + 3);
    for (let i = 0, x = 12345; i < bytes.length; i++) {
      x = (Math.imul(x, 1103515245) + 12345) >>> 0;
      bytes[i] = x >>> 24;
    }
    const key = sha256Bytes(bytes);
    const storage = running.services.storage;
    await running.db.sequelize.transaction((transaction) => storage.put(key, { bytes }, { transaction }));
    const back = await storage.get(key);
    expect(back?.length).toBe(bytes.length);
    expect(Buffer.compare(back!, bytes)).toBe(0);
    await running.db.sequelize.transaction((transaction) => storage.delete(key, { transaction }));
    expect(await storage.get(key)).toBeNull();
  });

  test('stored bytes are kept uncompressed, even when they would compress (so a slice is read without the bytes before it)', async () => {
    const bytes = Buffer.alloc(3 * 1024 * 1024, 7);
    const key = sha256Bytes(bytes);
    const storage = running.services.storage;
    await running.db.sequelize.transaction((transaction) => storage.put(key, { bytes }, { transaction }));
    const [[row]] = (await running.db.sequelize.query('SELECT pg_column_size(data)::int AS stored FROM files WHERE key = $1', { bind: [key] })) as [
      { stored: number }[],
      unknown,
    ];
    expect(row.stored).toBeGreaterThanOrEqual(bytes.length);
    expect(Buffer.compare((await storage.get(key))!, bytes)).toBe(0);
    await running.db.sequelize.transaction((transaction) => storage.delete(key, { transaction }));
  });

  test('a key that is not a SHA-256 digest is refused', async () => {
    await expect(
      running.db.sequelize.transaction((transaction) => running.services.storage.put('../etc/passwd', { bytes: new Uint8Array(1) }, { transaction })),
    ).rejects.toThrow(RangeError);
  });
});

describe('the S3 driver against a local S3-compatible server', () => {
  let s3rver: { run(): Promise<{ port: number }>; close(): Promise<void> };
  let dir: string;
  let endpoint: string;
  let running: Running;
  let client: S3Client;
  const s3Config = (bucket: string): S3StorageConfig => ({
    driver: 's3',
    endpoint,
    region: 'us-east-1',
    bucket,
    // s3rver's built-in account.
    accessKeyId: 'S3RVER',
    secretAccessKey: 'S3RVER',
    forcePathStyle: true,
  });

  beforeAll(async () => {
    dir = mkdtempSync(path.join(tmpdir(), 'sinterstack-s3-'));
    s3rver = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory: dir, configureBuckets: [{ name: BUCKET }] });
    const { port } = await s3rver.run();
    endpoint = `http://127.0.0.1:${port}`;
    running = await startTestApp({ storage: s3Config(BUCKET) });
    client = new S3Client({ endpoint, region: 'us-east-1', forcePathStyle: true, credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } });
  });
  afterAll(async () => {
    client?.destroy();
    await running?.close();
    await s3rver?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  const objectExists = async (key: string) => {
    try {
      await client.send(new HeadObjectCommand({ Bucket: BUCKET, Key: `files/${key}` }));
      return true;
    } catch {
      return false;
    }
  };

  test('an upload is kept as one object, read back byte for byte, and removed with its last part', async () => {
    const { agent, labId } = await signUp(running, 's3');
    const bytes = stl(8);
    const key = sha256Bytes(bytes);
    const a = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'a.stl');
    const b = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'b.stl');
    expect(a.status).toBe(201);
    expect(b.status).toBe(201);
    expect(await objectExists(key)).toBe(true);
    expect(await rowCounts(running, key)).toEqual({ parts: 2, files: 1 });
    const [[row]] = (await running.db.sequelize.query('SELECT location, data FROM files WHERE key = $1', { bind: [key] })) as [
      { location: string; data: Buffer | null }[],
      unknown,
    ];
    expect(row).toEqual({ location: 's3', data: null });

    const file = await agent.get(`/api/labs/${labId}/parts/${b.body.parts[0].id}/file`).buffer(true).parse(asBytes);
    expect(file.status).toBe(200);
    expect(Buffer.compare(file.body as Buffer, bytes)).toBe(0);

    expect((await agent.delete(`/api/labs/${labId}/parts/${a.body.parts[0].id}`)).status).toBe(204);
    expect(await objectExists(key)).toBe(true);
    expect((await agent.delete(`/api/labs/${labId}/parts/${b.body.parts[0].id}`)).status).toBe(204);
    expect(await rowCounts(running, key)).toEqual({ parts: 0, files: 0 });
    // The object goes after the commit, in the background.
    for (let i = 0; i < 50 && (await objectExists(key)); i++) await new Promise((r) => setTimeout(r, 50));
    expect(await objectExists(key)).toBe(false);
  });

  test('when the part row fails after the object was written, the object is removed again', async () => {
    const { agent, labId } = await signUp(running, 's3rollback');
    const bytes = stl(11);
    const key = sha256Bytes(bytes);
    const create = jest.spyOn(running.db.models.Part, 'create').mockRejectedValueOnce(new Error('injected failure'));
    try {
      const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'rolled-back.stl');
      expect(res.status).toBe(500);
    } finally {
      create.mockRestore();
    }
    expect(await rowCounts(running, key)).toEqual({ parts: 0, files: 0 });
    expect(await objectExists(key)).toBe(false);
  });

  test('an upload rolled back while another upload of the same bytes commits leaves the object in place', async () => {
    const bytes = stl(12);
    const key = sha256Bytes(bytes);
    const { sequelize } = running.db;
    const storage = running.services.storage;
    const first = await sequelize.transaction();
    expect(await storage.put(key, { bytes }, { transaction: first })).toEqual({ created: true });
    // The second upload waits for the first to settle, then writes the object again.
    const second = sequelize.transaction((transaction) => storage.put(key, { bytes }, { transaction }));
    await new Promise((r) => setTimeout(r, 100));
    await first.rollback();
    await storage.discard(key);
    await second;
    expect(await rowCounts(running, key)).toEqual({ parts: 0, files: 1 });
    expect(await objectExists(key)).toBe(true);
    expect(Buffer.compare((await storage.get(key))!, bytes)).toBe(0);
    await sequelize.transaction((transaction) => storage.delete(key, { transaction }));
  });

  test('when the object store fails, the upload answers 503 and leaves no part or file row', async () => {
    // A bucket that does not exist makes every write fail, as a broken store would.
    const broken = await startTestApp({ storage: s3Config('no-such-bucket') });
    try {
      const { agent, labId } = await signUp(broken, 's3broken');
      const bytes = stl(9);
      const key = sha256Bytes(bytes);
      const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'lost.stl');
      expect(res.status).toBe(503);
      expect(res.body.error.code).toBe('storage_unavailable');
      expect(await rowCounts(broken, key)).toEqual({ parts: 0, files: 0 });
      expect((await agent.get(`/api/labs/${labId}/parts`)).body.total).toBe(0);
    } finally {
      await broken.close();
    }
  });

  test('when the store is down and no file of an upload could be kept, the answer is 503 and nothing is stored', async () => {
    const down = await startTestApp({ storage: { ...s3Config(BUCKET), endpoint: 'http://127.0.0.1:9' } });
    try {
      const { agent, labId } = await signUp(down, 's3down');
      const bytes = stl(10);
      const res = await agent.post(`/api/labs/${labId}/parts`).attach('file', bytes, 'good.stl').attach('file', Buffer.alloc(0), 'empty.stl');
      expect(res.status).toBe(503);
      expect(await rowCounts(down, sha256Bytes(bytes))).toEqual({ parts: 0, files: 0 });
    } finally {
      await down.close();
    }
  });
});
