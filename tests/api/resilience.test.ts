import net from 'node:net';
import { spawn } from 'node:child_process';
import request from 'supertest';
import { signUp, startTestApp } from '../helpers/app';

/**
 * A TCP relay in front of PostgreSQL that can be cut and restored: to the
 * server it looks exactly like a database that restarts, without disturbing
 * the other test files that share the cluster.
 */
function relay(target: URL) {
  const sockets = new Set<net.Socket>();
  let up = true;
  const server = net.createServer((client) => {
    if (!up) return client.destroy();
    const upstream = net.connect(Number(target.port), target.hostname);
    sockets.add(client).add(upstream);
    client.pipe(upstream).pipe(client);
    const drop = () => {
      client.destroy();
      upstream.destroy();
      sockets.delete(client);
      sockets.delete(upstream);
    };
    client.on('error', drop).on('close', drop);
    upstream.on('error', drop).on('close', drop);
  });
  return {
    listen: () => new Promise<number>((r) => server.listen(0, '127.0.0.1', () => r((server.address() as net.AddressInfo).port))),
    cut() {
      up = false;
      for (const s of sockets) s.destroy();
    },
    restore() {
      up = true;
    },
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}

function runServerProcess(env: Record<string, string>): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn('npx', ['tsx', 'server/index.ts'], { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    const timer = setTimeout(() => child.kill('SIGKILL'), 30_000);
    child.on('exit', (code) => {
      clearTimeout(timer);
      resolve({ code, stderr });
    });
  });
}

jest.setTimeout(60_000);

test('while the database is away requests answer 503, and work again once it is back, without a restart', async () => {
  const target = new URL(process.env.DATABASE_URL!);
  const r = relay(target);
  const port = await r.listen();
  const url = new URL(target.href);
  url.port = String(port);
  const running = await startTestApp({ databaseUrl: url.href });
  try {
    const { agent } = await signUp(running, 'resilient');
    expect((await agent.get('/api/me')).status).toBe(200);
    r.cut();
    const health = await request(running.app).get('/api/health');
    expect(health.status).toBe(503);
    expect(health.body).toEqual({ ok: false, db: false });
    const me = await agent.get('/api/me');
    expect(me.status).toBe(503);
    expect(me.body.error.code).toBe('db_unavailable');
    r.restore();
    let back = 0;
    for (let i = 0; i < 40 && back !== 200; i++) {
      back = (await agent.get('/api/me')).status;
      if (back !== 200) await new Promise((res) => setTimeout(res, 250));
    }
    expect(back).toBe(200);
  } finally {
    await running.close();
    await r.close();
  }
});

test('a database that is down at start-up gives one clear line and a non-zero exit', async () => {
  const { code, stderr } = await runServerProcess({ DATABASE_URL: 'postgres://nobody:x@127.0.0.1:9/none', PORT: '0' });
  expect(code).not.toBe(0);
  expect(stderr.trim().split('\n')).toHaveLength(1);
  expect(stderr).toMatch(/cannot reach the database at 127\.0\.0\.1:9/);
});

test('a port already in use gives one line naming the port', async () => {
  const blocker = net.createServer();
  const port = await new Promise<number>((r) => blocker.listen(0, '127.0.0.1', () => r((blocker.address() as net.AddressInfo).port)));
  try {
    const { code, stderr } = await runServerProcess({ PORT: String(port), NODE_ENV: 'test' });
    expect(code).not.toBe(0);
    expect(stderr.trim().split('\n')).toHaveLength(1);
    expect(stderr).toContain(`port ${port} is already in use`);
  } finally {
    blocker.close();
  }
});
