import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { portFree, portToStartOn } from '../../../scripts/lib/postgres';

/** A loopback port another program holds while the test runs. */
function hold(): Promise<{ server: Server; port: number }> {
  return new Promise((done) => {
    const server = createServer();
    server.listen(0, '127.0.0.1', () => done({ server, port: (server.address() as { port: number }).port }));
  });
}

describe("the project's PostgreSQL port", () => {
  let dir: string;
  const asked = process.env.SINTERSTACK_PG_PORT;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'pg-port-'));
    delete process.env.SINTERSTACK_PG_PORT;
  });
  afterEach(() => {
    rmSync(dir, { recursive: true, force: true });
    if (asked === undefined) delete process.env.SINTERSTACK_PG_PORT;
    else process.env.SINTERSTACK_PG_PORT = asked;
  });

  it('moves to the next free port when the kept one is taken, says so, and keeps the new one', async () => {
    const { server, port } = await hold();
    try {
      const file = join(dir, 'pg-port');
      writeFileSync(file, `${port}\n`);
      const said: string[] = [];
      const chosen = await portToStartOn((s) => said.push(s), file);
      expect(chosen).toBeGreaterThan(port);
      expect(await portFree(chosen)).toBe(true);
      expect(Number(readFileSync(file, 'utf8'))).toBe(chosen);
      expect(said.join('\n')).toContain(`Port ${port} is taken`);
    } finally {
      server.close();
    }
  });

  it('keeps a free kept port as it is', async () => {
    const { server, port } = await hold();
    await new Promise((done) => server.close(done));
    const file = join(dir, 'pg-port');
    writeFileSync(file, `${port}\n`);
    const said: string[] = [];
    expect(await portToStartOn((s) => said.push(s), file)).toBe(port);
    expect(said).toEqual([]);
  });

  it('takes SINTERSTACK_PG_PORT as asked, even when taken, and refuses one that is not a port', async () => {
    const { server, port } = await hold();
    try {
      process.env.SINTERSTACK_PG_PORT = String(port);
      expect(await portToStartOn(() => {}, join(dir, 'pg-port'))).toBe(port);
      process.env.SINTERSTACK_PG_PORT = '70000';
      await expect(portToStartOn(() => {}, join(dir, 'pg-port'))).rejects.toThrow('SINTERSTACK_PG_PORT must be a port number (1-65535), not "70000"');
    } finally {
      server.close();
    }
  });
});
