/**
 * Malformed and oversized requests: each answers 4xx in the one error shape,
 * naming what is wrong, and none reaches the services.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { addMember, ORIGIN, signUp, startTestApp } from '../helpers/app';
import { labWithProfiles, makeRequest, createPlan } from '../helpers/plans';
import type { Running } from '../../server/boot';
import { prism, writeBinaryStl } from '../../shared/geometry';

jest.setTimeout(60_000);

let running: Running;
let server: http.Server;
let port: number;
beforeAll(async () => {
  running = await startTestApp();
  server = http.createServer(running.app).listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  port = (server.address() as AddressInfo).port;
});
afterAll(async () => {
  await new Promise((r) => server.close(r));
  await running.close();
});

/** Sends headers and only the first bytes of a body; resolves with the status the server answers, or 'no answer' after 5 s. */
function partialPost(path: string, headers: Record<string, string | number>, firstBytes: string): Promise<{ status: number | 'no answer'; body: string }> {
  return new Promise((resolve, reject) => {
    const req = http.request({ host: '127.0.0.1', port, path, method: 'POST', headers: { Origin: ORIGIN, ...headers } }, (res) => {
      let body = '';
      res.on('data', (c) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode!, body }));
    });
    req.on('error', (e) => (e.message.includes('socket hang up') || (e as NodeJS.ErrnoException).code === 'ECONNRESET' ? undefined : reject(e)));
    const timer = setTimeout(() => {
      req.destroy();
      resolve({ status: 'no answer', body: '' });
    }, 5000);
    req.on('response', () => clearTimeout(timer));
    req.write(firstBytes);
  });
}

describe('body size by route, before anything is parsed', () => {
  test('an anonymous 4.6 MB JSON body is refused with 413 from its length alone, before the body is read', async () => {
    const res = await partialPost('/api/auth/sign-in', { 'Content-Type': 'application/json', 'Content-Length': 4_600_000 }, '{"email":"');
    expect(res.status).toBe(413);
    const body = JSON.parse(res.body);
    expect(body.error.code).toBe('too_large');
    expect(body.error.message).toContain('16 kB before signing in');
  });

  test('a signed-in member sends at most 256 kB to an ordinary route, and more only where the route needs it', async () => {
    const owner = await labWithProfiles(running, 'limits');
    const big = { name: 'x'.repeat(300 * 1024) };
    const res = await owner.agent.post(`/api/labs/${owner.labId}/machines`).send(big);
    expect(res.status).toBe(413);
    expect(res.body.error).toMatchObject({ code: 'too_large' });
    expect(res.body.error.message).toContain('256 kB');
    // A plan's draft may be up to 1,000,000 bytes: its route takes 2 MB.
    const lines = await makeRequest(running, owner.labId, owner.userId, owner.materialId, [{ name: 'Bracket', sizeMm: [20, 20, 10], quantity: 2 }]);
    const plan = await createPlan(owner.agent, owner.labId, owner.machineId, owner.materialId, lines.lines);
    const draft = { note: 'y'.repeat(900_000) };
    const saved = await owner.agent.put(`/api/labs/${owner.labId}/plans/${plan.id}`).send({ version: plan.view.version, draft });
    expect(saved.status).toBe(200);
  });
});

describe('free-form JSON depth', () => {
  test('a plan draft nested 5,000 levels deep is refused with 400 naming the draft', async () => {
    const owner = await labWithProfiles(running, 'deep');
    const lines = await makeRequest(running, owner.labId, owner.userId, owner.materialId, [{ name: 'Clip', sizeMm: [10, 10, 10], quantity: 1 }]);
    const plan = await createPlan(owner.agent, owner.labId, owner.machineId, owner.materialId, lines.lines);
    const deep = '['.repeat(5000) + ']'.repeat(5000);
    const res = await owner.agent
      .put(`/api/labs/${owner.labId}/plans/${plan.id}`)
      .set('Content-Type', 'application/json')
      .send(`{"version":${plan.view.version},"draft":${deep}}`);
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'too_deep', field: 'draft[0][0]' });
    expect(res.body.error.message).toContain('more than 64 levels');
    // a draft of ordinary depth is kept
    const ok = await owner.agent.put(`/api/labs/${owner.labId}/plans/${plan.id}`).send({ version: plan.view.version, draft: { a: [{ b: [1, 2] }] } });
    expect(ok.status).toBe(200);
  });
});

describe('control characters in text', () => {
  test('a NUL in a part tag is refused naming the tag, and nothing is changed', async () => {
    const { agent: a, labId } = await signUp(running, 'nul-tag');
    const up = await a.post(`/api/labs/${labId}/parts`).attach('file', Buffer.from(writeBinaryStl(prism([[0, 0], [9, 0], [9, 9], [0, 9]], 0, 9), `nul ${Date.now()}`)), 'tagme.stl');
    expect(up.status).toBe(201);
    const partId = up.body.parts[0].id;
    const res = await a.patch(`/api/labs/${labId}/parts/${partId}`).send({ tags: ['ok', 'bad\u0000tag'] });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'tags[1]' });
    expect(res.body.error.message).toContain('control character');
    expect((await a.get(`/api/labs/${labId}/parts/${partId}`)).body.tags).toEqual([]);
  });

  test('a NUL in a plan draft is refused naming where it is', async () => {
    const owner = await labWithProfiles(running, 'nul-draft');
    const lines = await makeRequest(running, owner.labId, owner.userId, owner.materialId, [{ name: 'Gear', sizeMm: [10, 10, 5], quantity: 1 }]);
    const plan = await createPlan(owner.agent, owner.labId, owner.machineId, owner.materialId, lines.lines);
    const res = await owner.agent.put(`/api/labs/${owner.labId}/plans/${plan.id}`).send({ version: plan.view.version, draft: { notes: ['fine', { text: 'a\u0000b' }] } });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('draft.notes[1].text');
  });

  test('every other text field refuses NUL and other control characters, naming the field', async () => {
    const owner = await labWithProfiles(running, 'nul-fields');
    const lab = owner.labId;
    const id = '00000000-0000-4000-8000-000000000000';
    const cases: [string, 'post' | 'patch' | 'put', string, Record<string, unknown>, string][] = [
      ['sign-up name', 'post', '/api/auth/sign-up', { email: 'n@test.example', password: 'long enough pass', name: 'A\u0000', labName: 'L' }, 'name'],
      ['sign-up lab name', 'post', '/api/auth/sign-up', { email: 'n@test.example', password: 'long enough pass', name: 'A', labName: 'L\u0001' }, 'labName'],
      ['sign-in e-mail', 'post', '/api/auth/sign-in', { email: 'a\u0000@test.example', password: 'x' }, 'email'],
      ['invite e-mail', 'post', `/api/labs/${lab}/invites`, { email: 'x\u0000@test.example', roles: ['designer'] }, 'email'],
      ['invite acceptance name', 'post', `/api/invites/abc/accept`, { name: 'N\u001b[31m', password: 'long enough pass' }, 'name'],
      ['machine name', 'post', `/api/labs/${lab}/machines`, { name: 'M\u0000' }, 'name'],
      ['material name', 'patch', `/api/labs/${lab}/materials/${owner.materialId}`, { name: 'P\u0000' }, 'name'],
      ['request title', 'post', `/api/labs/${lab}/requests`, { title: 'T\u0000', materialId: id, lines: [] }, 'title'],
      ['request notes', 'patch', `/api/labs/${lab}/requests/${id}`, { notes: 'line one\nline two\u0000' }, 'notes'],
      ['plan name', 'post', `/api/labs/${lab}/plans`, { name: 'P\u0007', machineId: id, materialId: id, lines: [] }, 'name'],
      ['layout label', 'patch', `/api/labs/${lab}/plans/${id}/layouts/${id}`, { label: 'L\u0000' }, 'label'],
      ['submission comment', 'post', `/api/labs/${lab}/plans/${id}/submit`, { comment: 'c\u0000' }, 'comment'],
      ['review comment', 'post', `/api/labs/${lab}/plans/${id}/review`, { decision: 'approve', comment: 'c\u007f' }, 'comment'],
      ['abort reason', 'post', `/api/labs/${lab}/plans/${id}/run/advance`, { to: 'aborted', reason: 'r\u0000' }, 'reason'],
      ['a key of an object', 'post', `/api/labs/${lab}/machines`, { ['na\u0000me']: 'M' }, 'na?me'],
    ];
    for (const [what, method, path, body, field] of cases) {
      const res = await owner.agent[method](path).send(body);
      expect({ what, status: res.status, code: res.body.error?.code, field: res.body.error?.field }).toEqual({ what, status: 400, code: 'invalid_input', field });
    }
    // Tabs and line breaks are text, not control characters.
    const notes = await owner.agent.post(`/api/labs/${lab}/machines`).send({ name: 'tab\there' });
    expect(notes.body.error?.message ?? '').not.toContain('control character');
  });

  test('a NUL in a query string is refused naming the parameter, and in an address', async () => {
    const { agent: a, labId } = await signUp(running, 'nul-query');
    const res = await a.get(`/api/labs/${labId}/parts?search=a%00b`);
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'search' });
    const path = await a.get(`/api/invites/abc%00def`);
    expect(path.status).toBe(400);
  });
});

describe('multipart bodies that cannot be read', () => {
  test('multipart without a boundary answers 400', async () => {
    const { agent: a, labId } = await signUp(running, 'noboundary');
    const res = await a.post(`/api/labs/${labId}/parts`).set('Content-Type', 'multipart/form-data').send('--x\r\n\r\n');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_upload');
  });

  test('a multipart body cut short answers 400 and keeps nothing', async () => {
    const { agent: a, labId } = await signUp(running, 'truncated');
    const body = '--XYZ\r\nContent-Disposition: form-data; name="file"; filename="cut.stl"\r\nContent-Type: model/stl\r\n\r\nsolid a\nfacet normal 0 0 0';
    const res = await a.post(`/api/labs/${labId}/parts`).set('Content-Type', 'multipart/form-data; boundary=XYZ').send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_upload');
    expect((await a.get(`/api/labs/${labId}/parts`)).body.total).toBe(0);
  });
});

describe('changes that collide', () => {
  test('two leads demoting each other at the same moment never get a 500, and the lab keeps a lead', async () => {
    for (let round = 0; round < 8; round++) {
      const owner = await signUp(running, `dead${round}`);
      const other = await addMember(running, owner.agent, owner.labId, ['lead', 'planner'], `dead${round}b`);
      const [a, b] = await Promise.all([
        owner.agent.patch(`/api/labs/${owner.labId}/members/${other.userId}`).send({ roles: ['planner'] }),
        other.agent.patch(`/api/labs/${owner.labId}/members/${owner.userId}`).send({ roles: ['planner'] }),
      ]);
      for (const res of [a, b]) {
        expect([200, 403, 409]).toContain(res.status);
        expect(res.body.error?.code ?? 'ok').not.toBe('internal');
      }
      // exactly one of them went through; the other found it was no longer a lead, or the last lead
      expect([a.status, b.status].filter((s) => s === 200)).toHaveLength(1);
      const members = (await owner.agent.get(`/api/labs/${owner.labId}/members`).then((r) => (r.status === 200 ? r : other.agent.get(`/api/labs/${owner.labId}/members`)))).body;
      expect(members.filter((m: { roles: string[] }) => m.roles.includes('lead'))).toHaveLength(1);
    }
  });
});
