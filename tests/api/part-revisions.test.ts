import { startTestApp } from '../helpers/app';
import { createPlan } from '../helpers/plans';
import { labWithCrew } from './runs-fixtures';
import { partRevisionsViewSchema } from '../../shared/schemas/parts';
import { prism, writeBinaryStl } from '../../shared/geometry';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const block = (x: number, y: number, z: number) => Buffer.from(writeBinaryStl(prism([[0, 0], [x, 0], [x, y], [0, y]], 0, z), 'block'));

describe('file revisions of a part', () => {
  test('a designer adds a new file: the library, new requests and new plans use it; a build already planned keeps the file it used', async () => {
    const lab = await labWithCrew(running, 'revisions');
    const designer = lab.designer.agent;
    const partsUrl = `/api/labs/${lab.labId}/parts`;
    const first = await designer.post(partsUrl).attach('file', block(20, 10, 5), 'bracket.stl');
    expect(first.status).toBe(201);
    const v1 = first.body.parts[0].id as string;
    await designer.patch(`${partsUrl}/${v1}`).send({ name: 'Bracket', tags: ['jig'] });

    // One request planned already, one not yet.
    const request = async (title: string, quantity: number) => {
      const res = await designer.post(`/api/labs/${lab.labId}/requests`).send({ title, materialId: lab.materialId, dueDate: '2027-06-01', lines: [{ partId: v1, quantity }] });
      expect(res.status).toBe(201);
      return res.body.lines[0].id as string;
    };
    const plannedLine = await request('Planned before', 4);
    const openLine = await request('Not planned yet', 3);
    const planned = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, [{ id: plannedLine, quantity: 4 }], 'Planned with the first file');

    const added = await designer.post(`${partsUrl}/${v1}/revisions`).attach('file', block(30, 10, 5), 'bracket-wider.stl');
    expect(added.status).toBe(201);
    const v2 = added.body.id as string;
    expect(v2).not.toBe(v1);
    expect(added.body).toMatchObject({ name: 'Bracket', tags: ['jig'], sizeMm: [30, 10, 5] });

    // Both revisions, newest first, each with the plans that use it.
    for (const id of [v1, v2]) {
      const revs = partRevisionsViewSchema.parse((await designer.get(`${partsUrl}/${id}/revisions`)).body);
      expect(revs.newestPartId).toBe(v2);
      expect(revs.revisions.map((r) => [r.partId, r.revision, r.current, r.fileName])).toEqual([
        [v2, 2, true, 'bracket-wider.stl'],
        [v1, 1, false, 'bracket.stl'],
      ]);
      expect(revs.revisions[1].plans.map((p) => p.id)).toEqual([planned.id]);
      expect(revs.revisions[0].plans).toEqual([]);
    }

    // The library shows the part once, as its newest file.
    const library = (await designer.get(`${partsUrl}?search=Bracket`)).body.items.map((p: { id: string }) => p.id);
    expect(library).toEqual([v2]);

    // The plan made before keeps the first file and its size; a new plan of the open line gets the new one.
    const before = (await lab.agent.get(`/api/labs/${lab.labId}/plans/${planned.id}`)).body;
    expect(before.lines[0].part).toMatchObject({ id: v1, sizeMm: [20, 10, 5] });
    const fresh = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, [{ id: openLine, quantity: 3 }], 'Planned with the new file');
    expect(fresh.view.lines[0].part).toMatchObject({ id: v2, sizeMm: [30, 10, 5] });

    // A new request naming the old revision (from its page, say) is made of the newest; both at once are one part.
    const viaOld = await designer.post(`/api/labs/${lab.labId}/requests`).send({ title: 'From the old page', materialId: lab.materialId, dueDate: '2027-06-01', lines: [{ partId: v1, quantity: 2 }] });
    expect(viaOld.status).toBe(201);
    expect(viaOld.body.lines[0].partId).toBe(v2);
    const both = await designer
      .post(`/api/labs/${lab.labId}/requests`)
      .send({ title: 'Both', materialId: lab.materialId, dueDate: '2027-06-01', lines: [{ partId: v1, quantity: 1 }, { partId: v2, quantity: 1 }] });
    expect(both.status).toBe(400);
    expect(both.body.error.field).toBe('lines[1].partId');
  });

  test('only the newest revision takes a new file; a bad file, a second file or an operator is refused and nothing changes', async () => {
    const lab = await labWithCrew(running, 'revisions-refused');
    const partsUrl = `/api/labs/${lab.labId}/parts`;
    const v1 = (await lab.designer.agent.post(partsUrl).attach('file', block(10, 10, 10), 'cube.stl')).body.parts[0].id as string;

    expect((await lab.operator.agent.post(`${partsUrl}/${v1}/revisions`).attach('file', block(12, 10, 10), 'cube2.stl')).status).toBe(403);
    const broken = await lab.designer.agent.post(`${partsUrl}/${v1}/revisions`).attach('file', Buffer.from('solid nothing\nendsolid'), 'broken.stl');
    expect(broken.status).toBe(400);
    expect(broken.body.error.field).toBe('file');
    const none = await lab.designer.agent.post(`${partsUrl}/${v1}/revisions`).field('unit', 'mm');
    expect(none.status).toBe(400);
    const two = await lab.designer.agent.post(`${partsUrl}/${v1}/revisions`).attach('file', block(12, 10, 10), 'a.stl').attach('file', block(13, 10, 10), 'b.stl');
    expect(two.status).toBe(400);
    expect((await lab.designer.agent.get(`${partsUrl}/${v1}/revisions`)).body.revisions).toHaveLength(1);

    const v2 = (await lab.designer.agent.post(`${partsUrl}/${v1}/revisions`).attach('file', block(12, 10, 10), 'cube2.stl')).body.id as string;
    const old = await lab.designer.agent.post(`${partsUrl}/${v1}/revisions`).attach('file', block(14, 10, 10), 'cube3.stl');
    expect(old.status).toBe(409);
    expect(old.body.error).toMatchObject({ code: 'not_newest', newestPartId: v2 });
    expect((await lab.designer.agent.post(`${partsUrl}/${v2}/revisions`).attach('file', block(14, 10, 10), 'cube3.stl')).status).toBe(201);
  });
});
