import { agent, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import { DEMO_LAB_NAME, DEMO_PASSWORD } from '../../server/db/seeders/demo';
import { demoLibrary } from '../../shared/geometry';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

// `npm test` seeds the demo lab into the fresh test database before the suite runs.
describe('the demo lab', () => {
  test('has the generated part library, measured as closed meshes, and the designer\'s requests', async () => {
    const a = agent(running);
    const me = await a.post('/api/auth/sign-in').send({ email: 'designer@tinkerfin.example', password: DEMO_PASSWORD });
    expect(me.status).toBe(200);
    const lab = me.body.labs.find((l: { name: string }) => l.name === DEMO_LAB_NAME);
    expect(lab).toBeDefined();
    const parts = await a.get(`/api/labs/${lab.id}/parts`).query({ pageSize: 200, sort: 'name' });
    expect(parts.status).toBe(200);
    const expected = demoLibrary().map((p) => p.name).sort((x, y) => x.toLowerCase().localeCompare(y.toLowerCase()));
    // Browser tests share the demo lab and may have added parts of their own.
    expect(parts.body.items.map((p: { name: string }) => p.name)).toEqual(expect.arrayContaining(expected));
    const demo = parts.body.items.filter((p: { name: string }) => expected.includes(p.name));
    expect(demo).toHaveLength(expected.length);
    for (const p of demo) {
      expect(p.watertight).toBe(true);
      expect(p.volumeMm3).toBeGreaterThan(0);
      expect(p.uploadedBy.name).toBe('Demo Designer');
      expect(p.materialName).not.toBeNull();
    }
    const formats = new Set(demo.map((p: { file: { format: string } }) => p.file.format));
    expect(formats).toEqual(new Set(['stl', '3mf']));
    const hinges = demo.filter((p: { file: { name: string } }) => p.file.name === 'hinge-set.3mf');
    expect(hinges).toHaveLength(2);

    const requests = await a.get(`/api/labs/${lab.id}/requests`).query({ status: 'open' });
    // Other tests file requests in the demo lab too: look at the seeded three.
    const seeded = requests.body.items.filter((r: { title: string }) => ['Field repair kit', 'Gripper v3 prototypes', 'Sensor rig housings'].includes(r.title));
    expect(seeded.map((r: { title: string; priority: string }) => [r.title, r.priority])).toEqual([
      ['Field repair kit', 'urgent'],
      ['Gripper v3 prototypes', 'high'],
      ['Sensor rig housings', 'normal'],
    ]);
    for (const r of seeded) expect(r.lines.length).toBeGreaterThan(0);
  });
});
