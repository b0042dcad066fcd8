import http from 'node:http';
import type { Server } from 'node:http';
import { listen, type Running } from '../../server/boot';
import { addMember, agent, ORIGIN, PASSWORD, startTestApp, uniqueEmail } from '../helpers/app';
import { demoMachines } from '../../shared/demo/profiles';
import { topicOfPath } from '../../server/events/labEvents';

let running: Running;
let server: Server;
let port: number;
beforeAll(async () => {
  running = await startTestApp();
  server = await listen(running.app, 0, '127.0.0.1');
  port = (server.address() as { port: number }).port;
});
afterAll(async () => {
  server.closeAllConnections();
  await new Promise<void>((r) => server.close(() => r()));
  await running.close();
});

/** Signs in through the API and returns the agent and its session cookie. */
async function signInCookie(email: string, password = PASSWORD) {
  const a = agent(running);
  const res = await a.post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status}`);
  const cookie = String(res.headers['set-cookie']?.[0] ?? '').split(';')[0];
  return { agent: a, cookie };
}

async function newLab(tag: string) {
  const a = agent(running);
  const email = uniqueEmail(tag);
  const res = await a.post('/api/auth/sign-up').send({ email, password: PASSWORD, name: `Test ${tag}`, labName: `Lab of ${tag}` });
  expect(res.status).toBe(201);
  const cookie = String(res.headers['set-cookie']?.[0] ?? '').split(';')[0];
  return { agent: a, cookie, labId: res.body.labs[0].id as string, email };
}

/** An open event stream: the events as they arrive, and a wait for one. */
function openStream(labId: string, cookie: string) {
  const events: { event: string; data: unknown; at: number }[] = [];
  let buffer = '';
  let status = 0;
  const req = http.get({ host: '127.0.0.1', port, path: `/api/labs/${labId}/events`, headers: { cookie, Accept: 'text/event-stream', Origin: ORIGIN } }, (res) => {
    status = res.statusCode ?? 0;
    res.setEncoding('utf8');
    res.on('data', (chunk: string) => {
      buffer += chunk;
      let cut: number;
      while ((cut = buffer.indexOf('\n\n')) >= 0) {
        const block = buffer.slice(0, cut);
        buffer = buffer.slice(cut + 2);
        const name = /^event: (.*)$/m.exec(block)?.[1];
        const data = /^data: (.*)$/m.exec(block)?.[1];
        if (name) events.push({ event: name, data: data ? JSON.parse(data) : null, at: Date.now() });
      }
    });
  });
  req.on('error', () => {});
  const waitFor = async (pred: (e: { event: string; data: unknown }) => boolean, ms: number) => {
    const until = Date.now() + ms;
    while (Date.now() < until) {
      const found = events.find(pred);
      if (found) return found;
      await new Promise((r) => setTimeout(r, 20));
    }
    return null;
  };
  return { events, waitFor, status: () => status, close: () => req.destroy() };
}

const isChange = (topic: string) => (e: { event: string; data: unknown }) => e.event === 'change' && (e.data as { topic: string }).topic === topic;

describe('live updates', () => {
  test('a change made through the API reaches the lab\'s open screens within a second, and no other lab hears of it', async () => {
    const lab = await newLab('live-a');
    const other = await newLab('live-b');
    const mine = openStream(lab.labId, lab.cookie);
    const theirs = openStream(other.labId, other.cookie);
    expect(await mine.waitFor((e) => e.event === 'ready', 5000)).not.toBeNull();
    expect(await theirs.waitFor((e) => e.event === 'ready', 5000)).not.toBeNull();

    const sent = Date.now();
    const made = await lab.agent.post(`/api/labs/${lab.labId}/machines`).send({ ...demoMachines[0], name: 'Live test machine' });
    expect(made.status).toBe(201);
    const heard = await mine.waitFor(isChange('machines'), 1000 + (Date.now() - sent));
    expect(heard).not.toBeNull();
    expect((heard!.data as { id?: string }).id).toBeUndefined();
    await new Promise((r) => setTimeout(r, 300));
    expect(theirs.events.filter((e) => e.event === 'change')).toHaveLength(0);
    mine.close();
    theirs.close();
  });

  test('a request refused with an error announces nothing', async () => {
    const lab = await newLab('live-refused');
    const stream = openStream(lab.labId, lab.cookie);
    await stream.waitFor((e) => e.event === 'ready', 5000);
    const bad = await lab.agent.post(`/api/labs/${lab.labId}/machines`).send({ name: '' });
    expect(bad.status).toBe(400);
    await new Promise((r) => setTimeout(r, 500));
    expect(stream.events.filter((e) => e.event === 'change')).toHaveLength(0);
    stream.close();
  });

  test('a member hears only what their roles may know of: invites reach leads, not operators', async () => {
    const lab = await newLab('live-roles');
    const operator = await addMember(running, lab.agent, lab.labId, ['operator'], 'live-operator');
    const { cookie } = await signInCookie(operator.email);
    const leadStream = openStream(lab.labId, lab.cookie);
    const opStream = openStream(lab.labId, cookie);
    await leadStream.waitFor((e) => e.event === 'ready', 5000);
    await opStream.waitFor((e) => e.event === 'ready', 5000);

    const inv = await lab.agent.post(`/api/labs/${lab.labId}/invites`).send({ email: uniqueEmail('live-invitee'), roles: ['designer'] });
    expect(inv.status).toBe(201);
    expect(await leadStream.waitFor(isChange('invites'), 2000)).not.toBeNull();
    // A later change the operator may hear proves their stream was open all along.
    await lab.agent.post(`/api/labs/${lab.labId}/machines`).send({ ...demoMachines[0], name: 'Second live machine' });
    expect(await opStream.waitFor(isChange('machines'), 2000)).not.toBeNull();
    expect(opStream.events.some(isChange('invites'))).toBe(false);
    leadStream.close();
    opStream.close();
  });

  test('someone outside the lab cannot open its stream (404, as every lab route)', async () => {
    const lab = await newLab('live-closed');
    const stranger = await newLab('live-stranger');
    const stream = openStream(lab.labId, stranger.cookie);
    await new Promise((r) => setTimeout(r, 500));
    expect(stream.status()).toBe(404);
    expect(stream.events).toHaveLength(0);
    stream.close();
    const anonymous = openStream(lab.labId, '');
    await new Promise((r) => setTimeout(r, 500));
    expect(anonymous.status()).toBe(401);
    anonymous.close();
  });

  test('routes map to the kind of record they change', () => {
    const lab = '0f8fad5b-d9cb-469f-a165-70867728950e';
    expect(topicOfPath(`/api/labs/${lab}/plans/p1/review`)).toEqual({ labId: lab, topic: 'plans', id: 'p1' });
    expect(topicOfPath(`/api/labs/${lab}/plans/p1/run/advance`)).toEqual({ labId: lab, topic: 'runs', id: 'p1' });
    expect(topicOfPath(`/api/labs/${lab}/machines/m1/queue`)).toEqual({ labId: lab, topic: 'queue', id: 'm1' });
    expect(topicOfPath(`/api/labs/${lab}/requests`)).toEqual({ labId: lab, topic: 'requests', id: undefined });
    expect(topicOfPath('/api/auth/sign-in')).toBeNull();
  });
});
