import { createHash } from 'node:crypto';
import { startTestApp } from '../helpers/app';
import { labWithProfiles } from '../helpers/plans';
import type { Running } from '../../server/boot';
import { labWithCrew, queuedPlan } from './runs-fixtures';
import { export3mfService } from '../../server/services/export3mf';
import { parse3mf, prism, read3mfModel, writeBinaryStl } from '../../shared/geometry';
import { ROTATION_CODES } from '../../shared/geometry/rotations';
import { INSTANCE_FORMAT_V2, parseInstance, summariseLayout, type PackInstanceInput, type PackResult, type Placement } from '../../shared/packing';
import { summariseShapeLayout } from '../../shared/packing/shape';
import { RULE_ROTATIONS } from '../../shared/plans/instance';

jest.setTimeout(30_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

/** A closed box from the origin to `size`, triangles wound outwards. */
function boxMesh([x, y, z]: [number, number, number]) {
  const positions = new Float64Array([0, 0, 0, x, 0, 0, x, y, 0, 0, y, 0, 0, 0, z, x, 0, z, x, y, z, 0, y, z]);
  const indices = new Uint32Array([0, 2, 1, 0, 3, 2, 4, 5, 6, 4, 6, 7, 0, 1, 5, 0, 5, 4, 1, 2, 6, 1, 6, 5, 2, 3, 7, 2, 7, 6, 3, 0, 4, 3, 4, 7]);
  return { positions, indices };
}

const binary = (res: any, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

// The part as uploaded is 30 x 8 x 20 mm and stored turned a quarter about x, so the plan packs it as 30 x 20 x 8.
const BAR = { name: 'Bar', sizeMm: [30, 20, 8] as [number, number, number], quantity: 3 };

/** Three bars side by side in three orientations, one of them an odd permutation of the axes. */
function threeOrientations(input: PackInstanceInput) {
  const parsed = parseInstance(input);
  if (!parsed.ok) throw new Error('bad instance');
  const id = parsed.instance.parts[0].id;
  const placements: Placement[] = [
    { id, position: [10, 10, 5], size: [30, 20, 8], orientation: 'xyz' },
    { id, position: [50, 10, 5], size: [20, 30, 8], orientation: 'yxz' },
    { id, position: [80, 10, 5], size: [8, 20, 30], orientation: 'zyx' },
  ];
  return summariseLayout(parsed.instance, placements, 5);
}

async function storeRealMesh(partId: string) {
  const bytes = Buffer.from(writeBinaryStl(boxMesh([30, 8, 20])));
  const key = createHash('sha256').update(bytes).digest('hex');
  await running.db.sequelize.query(
    `INSERT INTO files (key, size_bytes, location, data, ref_count, created_at) VALUES ($1, $2, 'postgres', $3, 1, now())
     ON CONFLICT (key) DO UPDATE SET ref_count = files.ref_count + 1`,
    { bind: [key, bytes.length, bytes] },
  );
  await running.db.sequelize.query(
    `UPDATE parts SET file_key = $2, file_name = 'bar.stl', rotation_deg = '{90,0,0}', uploaded_size_mm = '{30,8,20}' WHERE id = $1`,
    { bind: [partId, key] },
  );
}

describe('the packed build as a 3MF package', () => {
  test('reading the export back finds every placement: each part turned by its stored rotation and its orientation, at its position', async () => {
    const lab = await labWithCrew(running, 'export');
    const plan = await queuedPlan(running, lab, [BAR], { name: 'Bars', layout: threeOrientations });
    await storeRealMesh(plan.request.lines[0].partId);
    const res = await lab.operator.agent.get(`${plan.base}/build.3mf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('model/3mf');
    expect(res.headers['content-disposition']).toContain('Bars.3mf');
    const bytes = new Uint8Array(res.body);

    const model = read3mfModel(bytes, { filename: 'Bars.3mf' });
    if (!model.ok) throw new Error(JSON.stringify(model.problems));
    expect(model.model.unit).toBe('millimeter');
    expect(model.model.objects.size).toBe(1);
    expect(model.model.items).toHaveLength(3);
    for (const item of model.model.items) {
      const m = item.transform;
      // A turn, never a mirror image: the 3 x 3 part of the transform has determinant +1.
      const det = m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
      expect(det).toBeCloseTo(1, 12);
    }

    const parsed = parse3mf(bytes, { filename: 'Bars.3mf', splitObjects: true });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const boxes = parsed.parts.map((part) => {
      const min = [Infinity, Infinity, Infinity];
      const max = [-Infinity, -Infinity, -Infinity];
      for (let v = 0; v < part.positions.length; v += 3) {
        for (let k = 0; k < 3; k++) {
          min[k] = Math.min(min[k], part.positions[v + k]);
          max[k] = Math.max(max[k], part.positions[v + k]);
        }
      }
      return { min, size: max.map((x, k) => x - min[k]) };
    });
    const expected = [
      { min: [10, 10, 5], size: [30, 20, 8] },
      { min: [50, 10, 5], size: [20, 30, 8] },
      { min: [80, 10, 5], size: [8, 20, 30] },
    ];
    boxes.sort((a, b) => a.min[0] - b.min[0]);
    boxes.forEach((box, i) => {
      for (let k = 0; k < 3; k++) {
        expect(box.min[k]).toBeCloseTo(expected[i].min[k], 9);
        expect(box.size[k]).toBeCloseTo(expected[i].size[k], 9);
      }
    });
  });

  test('a build file asked for again is made once, also when asked for twice at once; a part given another stored file makes it anew', async () => {
    const lab = await labWithCrew(running, 'exportcache');
    const plan = await queuedPlan(running, lab, [BAR], { name: 'Bars', layout: threeOrientations });
    await storeRealMesh(plan.request.lines[0].partId);
    let made = 0;
    const service = export3mfService(running.db, {
      storage: running.services.storage,
      layouts: running.services.layouts,
      write: async (job) => {
        made++;
        return new Uint8Array([made, job.items.length]);
      },
    });
    const [a, b] = await Promise.all([service.build(lab.labId, plan.planId), service.build(lab.labId, plan.planId)]);
    const c = await service.build(lab.labId, plan.planId);
    expect(made).toBe(1);
    expect([...a.bytes]).toEqual([1, 3]);
    expect([...b.bytes]).toEqual([1, 3]);
    expect([...c.bytes]).toEqual([1, 3]);
    // The part's file stored turned another way: another build file.
    await running.db.sequelize.query(`UPDATE parts SET rotation_deg = '{0,0,0}' WHERE id = $1`, { bind: [plan.request.lines[0].partId] });
    const d = await service.build(lab.labId, plan.planId);
    expect(made).toBe(2);
    expect([...d.bytes]).toEqual([2, 3]);
  });

  test('a plan that is not approved has no build file, and another lab\'s plan is not found', async () => {
    const lab = await labWithCrew(running, 'exportdraft');
    const plan = await queuedPlan(running, lab, [BAR], { approve: false, layout: threeOrientations });
    const res = await lab.agent.get(`${plan.base}/build.3mf`);
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'not_approved', status: 'in_review' });
    const other = await labWithProfiles(running, 'exportother');
    expect((await other.agent.get(`/api/labs/${other.labId}/plans/${plan.planId}/build.3mf`)).status).toBe(404);
    expect((await other.agent.get(`/api/labs/${lab.labId}/plans/${plan.planId}/build.3mf`)).status).toBe(404);
  });

  test('a part whose stored file is not a mesh stops the export with a message naming the part', async () => {
    const lab = await labWithCrew(running, 'exportbad');
    const plan = await queuedPlan(running, lab, [BAR], { layout: threeOrientations });
    // Its stored bytes replaced by something that is not a mesh.
    await running.db.sequelize.query(
      `UPDATE files SET data = $1, size_bytes = 32 WHERE key IN (SELECT file_key FROM parts WHERE lab_id = $2 AND name = 'Bar')`,
      { bind: [Buffer.alloc(32, 7), lab.labId] },
    );
    const res = await lab.agent.get(`${plan.base}/build.3mf`);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('part_file_unreadable');
    expect(res.body.error.message).toContain('"Bar"');
  });

  test('a layout packed by shape exports each part by its own transform: an L turned half a turn about z lies mirrored across its box, not as stored', async () => {
    // An L of 30 x 20 mm, 8 mm thick: its six corners average x = 13.3 mm, left of its box's middle (15 mm).
    const ell = prism([[0, 0], [30, 0], [30, 10], [10, 10], [10, 20], [0, 20]], 0, 8);
    const halfTurn = ROTATION_CODES.indexOf('-x-y+z');
    const lab = await labWithCrew(running, 'exportshape');
    const shapeLayout = (input: PackInstanceInput) => {
      const parsed = parseInstance(input);
      if (!parsed.ok) throw new Error('bad instance');
      const parts = parsed.instance.parts.map((p) => ({ id: p.id, size: null, quantity: p.quantity, rotations: [...RULE_ROTATIONS.any], meshPath: null, mesh: ell }));
      // Half a turn has the same extents as none: only the transform tells them apart.
      return summariseShapeLayout({ ...parsed.instance, format: INSTANCE_FORMAT_V2, fit: 'shape', parts }, [{ id: parts[0].id, rotation: halfTurn, position: [10, 10, 5] }]) as unknown as PackResult;
    };
    const plan = await queuedPlan(running, lab, [{ name: 'Ell', sizeMm: [30, 20, 8], quantity: 1, mesh: ell }], { name: 'Ells', layout: shapeLayout });
    const res = await lab.operator.agent.get(`${plan.base}/build.3mf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const parsed = parse3mf(new Uint8Array(res.body), { filename: 'Ells.3mf', splitObjects: true });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    expect(parsed.parts).toHaveLength(1);
    const p = parsed.parts[0].positions;
    let minX = Infinity, maxX = -Infinity, sumX = 0;
    for (let v = 0; v < p.length; v += 3) {
      minX = Math.min(minX, p[v]);
      maxX = Math.max(maxX, p[v]);
      sumX += p[v];
    }
    expect(minX).toBeCloseTo(10, 9);
    expect(maxX).toBeCloseTo(40, 9);
    // Turned half a turn, the corners average 30 - 13.3 = 16.7 mm from the box's low side (as stored they would average 13.3).
    expect(sumX / (p.length / 3) - minX).toBeCloseTo(30 - 80 / 6, 9);
  });
});
