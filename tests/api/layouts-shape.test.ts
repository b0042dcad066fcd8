/**
 * Keeping a layout packed by the parts' shapes ("pack-result/2"): the server
 * is the trust boundary, so before it keeps one it checks the placed meshes
 * themselves on a mesh worker (the same worker and files that slice the
 * layout for its estimate). A peg standing in a frame's hole shares the
 * frame's box but keeps clear of its walls: kept by shape, refused by boxes.
 * Moved against a wall, or turned in a way its line's rule forbids, it is
 * refused naming the placement. With no worker to check it, nothing is kept.
 */
import type { Running } from '../../server/boot';
import { startTestApp } from '../helpers/app';
import { layoutsService } from '../../server/services/layouts';
import { createPlan, labWithProfiles, makeRequest, planInstance } from '../helpers/plans';
import { prism, prismWithHoles } from '../../shared/geometry';
import { ROTATION_CODES } from '../../shared/geometry/rotations';
import { RULE_ROTATIONS } from '../../shared/plans/instance';
import { INSTANCE_FORMAT_V2, packSync, parseInstance, type PackInstanceV2 } from '../../shared/packing';
import { createShapePacking, summariseShapeLayout } from '../../shared/packing/shape';

jest.setTimeout(240_000);

const apps: Running[] = [];
afterAll(async () => {
  for (const app of apps.reverse()) await app.close();
});

// A 60 x 60 x 20 mm frame with a 30 x 30 mm square hole through it, and a 16 x 16 x 10 mm peg.
const frame = prismWithHoles(
  [[0, 0], [60, 0], [60, 60], [0, 60]],
  [[[15, 15], [15, 45], [45, 45], [45, 15]]],
  0,
  20,
);
const peg = prism([[0, 0], [16, 0], [16, 16], [0, 16]], 0, 10);
// Prism volumes (base area x height): 60² x 20 − 30² x 20 and 16² x 10 mm³.
const FRAME_VOLUME = 60 * 60 * 20 - 30 * 30 * 20;
const PEG_VOLUME = 16 * 16 * 10;

async function framePlan(app: Running, tag: string) {
  const lab = await labWithProfiles(app, tag);
  const { lines } = await makeRequest(app, lab.labId, lab.userId, lab.materialId, [
    { name: 'Frame', sizeMm: [60, 60, 20], quantity: 1, orientation: 'any', mesh: frame },
    { name: 'Peg', sizeMm: [16, 16, 10], quantity: 1, orientation: 'keep_up', mesh: peg },
  ]);
  const plan = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, lines);
  const instance = planInstance(plan.view, lab.machine, lab.material);
  const parsed = parseInstance(instance);
  if (!parsed.ok) throw new Error('fixture instance');
  // The same build by shape, each line's part as its mesh, turned as its rule allows.
  const rules = ['any', 'keep_up'] as const;
  const byShape: PackInstanceV2 = {
    ...parsed.instance,
    format: INSTANCE_FORMAT_V2,
    fit: 'shape',
    parts: parsed.instance.parts.map((p, i) => ({
      id: p.id,
      size: null,
      quantity: p.quantity,
      rotations: [...RULE_ROTATIONS[rules[i]]],
      meshPath: null,
      mesh: { positions: Float64Array.from((i === 0 ? frame : peg).positions), indices: Uint32Array.from((i === 0 ? frame : peg).indices) },
    })),
  };
  const [frameId, pegId] = byShape.parts.map((p) => p.id);
  return { lab, plan, instance, byShape, frameId, pegId, url: `/api/labs/${lab.labId}/plans/${plan.id}/layouts` };
}

/** The frame at the usable region's corner (the material's margins), the peg centred in its hole: 7 mm from each wall. */
const pegInHole = (byShape: PackInstanceV2, frameId: string, pegId: string) =>
  summariseShapeLayout(byShape, [
    { id: frameId, rotation: 0, position: [8, 8, 5] },
    { id: pegId, rotation: 0, position: [30, 30, 5] },
  ]);

describe('with a mesh worker', () => {
  let app: Running;
  beforeAll(async () => {
    app = await startTestApp();
    apps.push(app);
  });

  test('a peg standing in the hole of a frame is kept by shape, with its transforms, and estimated from the meshes', async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapekeep');
    // Usable region from (8, 8, 5) (the material's margins); the peg centred in the hole: 7 mm from each wall.
    const result = pegInHole(byShape, frameId, pegId);

    // As boxes the two overlap, so the box rules refuse the same placements.
    const asBoxes = await lab.agent.post(url).send({
      instance,
      result: { ...result, format: 'pack-result/1', placements: result.placements.map(({ transform: _t, ...p }) => ({ ...p, orientation: 'xyz' })), areaProfile: undefined, warnings: undefined },
    });
    expect(asBoxes.status).toBe(400);

    const kept = await lab.agent.post(url).send({ instance, result });
    expect(kept.status).toBe(201);
    expect(kept.body.estimate.profileSource).toBe('mesh');
    // Cavalieri: the sections times the layer height hold the two prisms' volume (within one layer's worth of outline).
    const area: number[] = kept.body.estimate.areaPerLayerMm2;
    const volume = area.reduce((s, a) => s + a, 0) * instance.layerHeight!;
    expect(Math.abs(volume - (FRAME_VOLUME + PEG_VOLUME))).toBeLessThan(0.01 * (FRAME_VOLUME + PEG_VOLUME));

    const back = await lab.agent.get(`${url}/${kept.body.id}`);
    expect(back.status).toBe(200);
    expect(back.body.resultFormat).toBe('pack-result/2');
    expect(back.body.result.placements).toHaveLength(2);
    expect(back.body.result.placements[1].transform).toEqual(result.placements[1].transform);
    expect(back.body.result.placements[1].position).toEqual([30, 30, 5]);
  });

  test('a peg 1 mm from the wall of the hole is refused naming the two placements, and nothing is kept', async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapeclash');
    // The hole's wall is at x = 8 + 15 = 23; the peg's side at 24: 1 mm, under the material's 3 mm spacing.
    const result = summariseShapeLayout(byShape, [
      { id: frameId, rotation: 0, position: [8, 8, 5] },
      { id: pegId, rotation: 0, position: [24, 30, 5] },
    ]);
    const res = await lab.agent.post(url).send({ instance, result });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toMatch(/^result\.placements\[[01]\]$/);
    expect(res.body.error.message).toMatch(/only 1\.0+ mm from placements\[[01]\]: the surfaces must be at least 3 mm apart/);
    const plan = await lab.agent.get(url.replace(/\/layouts$/, ''));
    expect(plan.body.layouts).toHaveLength(0);
  });

  test('a placement naming no line of the plan is refused with 400 naming it, before any worker is asked', async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapeunknown');
    const result = pegInHole(byShape, frameId, pegId);
    const res = await lab.agent.post(url).send({ instance, result: { ...result, placements: [result.placements[0], { ...result.placements[1], id: 'not-a-line' }] } });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('result.placements[1].id');
  });

  test('a transform that scales the part is refused with 400 naming it, before any worker is asked, and nothing is kept', async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapescaled');
    const result = pegInHole(byShape, frameId, pegId);
    // The frame twice its size: a 3MF transform may scale, a placement may not (before, the slicing failed on it: 503).
    const scaled = { ...result.placements[0], transform: [2, 0, 0, 0, 2, 0, 0, 0, 2, 8, 8, 5] };
    const res = await lab.agent.post(url).send({ instance, result: { ...result, placements: [scaled, result.placements[1]] } });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('result.placements[0].transform');
    expect(res.body.error.message).toContain('one of the 24 quarter-turn rotations (no mirror images, no scaling)');
    const plan = await lab.agent.get(url.replace(/\/layouts$/, ''));
    expect(plan.body.layouts).toHaveLength(0);
  });

  test("a peg laid on its side, which its line's rule (keep up) forbids, is refused naming its rotation", async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shaperule');
    // Allowed by the frame's rule; the check against the peg's line is the server's own.
    const lying = ROTATION_CODES.indexOf('+x+z-y');
    const result = summariseShapeLayout({ ...byShape, parts: byShape.parts.map((p) => ({ ...p, rotations: [...RULE_ROTATIONS.any] })) }, [
      { id: frameId, rotation: 0, position: [8, 8, 5] },
      { id: pegId, rotation: lying, position: [120, 8, 5] },
    ]);
    const res = await lab.agent.post(url).send({ instance, result });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('result.placements[1].orientation');
    expect(res.body.error.message).toContain('+x+z-y is not a rotation');
  });

  test('copies far too many (20,000 pegs where the line asks for 1, heaped in one spot) are refused at once naming the quantity, by shape and by box; nothing is kept', async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapeflood');
    const one = summariseShapeLayout(byShape, [
      { id: frameId, rotation: 0, position: [8, 8, 5] },
      { id: pegId, rotation: 0, position: [120, 8, 5] },
    ]);
    // Before, every pair of them was checked first: by box 40 s on the request thread (every request of the server
    // waited), by shape a mesh worker's two minutes and then 503.
    const flood = [one.placements[0], ...Array.from({ length: 20_000 }, () => one.placements[1])];
    const byShapeRes = await lab.agent.post(url).send({ instance, result: { ...one, placements: flood } });
    expect(byShapeRes.status).toBe(400);
    expect(byShapeRes.body.error.field).toBe('result.parts[1].quantity');
    expect(byShapeRes.body.error.message).toContain('has 20000 placed');
    const boxes = flood.map(({ transform: _t, ...p }) => ({ ...p, orientation: 'xyz' }));
    const byBoxRes = await lab.agent.post(url).send({ instance, result: { ...one, format: 'pack-result/1', placements: boxes, areaProfile: undefined } });
    expect(byBoxRes.status).toBe(400);
    expect(byBoxRes.body.error.field).toBe('result.parts[1].quantity');
    const plan = await lab.agent.get(url.replace(/\/layouts$/, ''));
    expect(plan.body.layouts).toHaveLength(0);
  });

  test('a top below the floor or beyond the chamber is refused naming the height, before any layer is counted from it', async () => {
    const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapeheight');
    const result = pegInHole(byShape, frameId, pegId);
    // 10 km of build would have been sliced into 100 million layers on a mesh worker (7 GB, then 503).
    for (const height of [-100, 1e7]) {
      const res = await lab.agent.post(url).send({ instance, result: { ...result, height } });
      expect(res.status).toBe(400);
      expect(res.body.error.field).toBe('result.height');
      expect(res.body.error.message).toMatch(/^result\.height must be the top of the highest placed part, from 0 to the chamber's \d+ mm/);
    }
  });

  test('a layout by shape with nothing placed (every copy left for another build) is kept, with no layers of parts', async () => {
    const { lab, byShape, instance, url } = await framePlan(app, 'shapeempty');
    const result = summariseShapeLayout(byShape, []);
    expect(result.unplaced).toHaveLength(2);
    // Before: no mesh to check it against read as no worker finishing, 503 however often it was tried.
    const res = await lab.agent.post(url).send({ instance, result });
    expect(res.status).toBe(201);
    expect(res.body.estimate.profileSource).toBe('box');
  });

  test('a plan whose lines change while its layout is being checked keeps nothing: 409 plan_changed', async () => {
    const { lab, plan, byShape, instance, frameId, pegId } = await framePlan(app, 'shapechanged');
    const result = pegInHole(byShape, frameId, pegId);
    // The check itself is not held under the plan's lock: a planner may change the lines while a worker checks.
    // Here the check's answer comes after a line's quantity was changed (as a second planner's save would).
    const service = layoutsService(app.db, {
      profilesFor: async () => {
        await app.db.sequelize.query('UPDATE plan_lines SET quantity = quantity + 1 WHERE plan_id = :plan AND request_line_id = :line', {
          replacements: { plan: plan.id, line: pegId },
        });
        return { areaPerLayerMm2: new Float64Array(0), contourPerLayerMm: new Float64Array(0), meshPlacements: 2, boxPlacements: 0, boxParts: [], problems: [] };
      },
    });
    await expect(service.add(lab.labId, plan.id, { id: lab.userId, role: 'planner' } as never, { instance, result } as never)).rejects.toMatchObject({ status: 409, code: 'plan_changed' });
    const after = await lab.agent.get(`/api/labs/${lab.labId}/plans/${plan.id}`);
    expect(after.body.layouts).toHaveLength(0);
  });

  test("the shape engine's own layout of the plan is kept as it is", async () => {
    const { lab, byShape, instance, url } = await framePlan(app, 'shapeengine');
    const result = createShapePacking({ ...byShape, timeLimitMs: 500 }, { maxRuns: 3 }).runSync();
    expect(result.unplaced).toEqual([]);
    const res = await lab.agent.post(url).send({ instance, result });
    expect(res.status).toBe(201);
    expect(res.body.estimate.profileSource).toBe('mesh');
  });
});

test('with no mesh worker to check it in time, a layout by shape is not kept: 503; the plan is not held while it waits', async () => {
  const app = await startTestApp({ meshWorker: false, layoutSliceWaitMs: 1500 });
  apps.push(app);
  const { lab, byShape, instance, frameId, pegId, url } = await framePlan(app, 'shapenoworker');
  const result = pegInHole(byShape, frameId, pegId);
  // While it waits for a worker, the plan is not held: a layout of the same plan is relabelled meanwhile (before, the
  // relabelling waited for the plan's lock until the 503, and a dozen such waits ran the database's connections dry).
  const parsed = parseInstance(instance);
  if (!parsed.ok) throw new Error('fixture instance');
  const box = await lab.agent.post(url).send({ instance, result: packSync(parsed.instance) });
  expect(box.status).toBe(201);
  const order: string[] = [];
  const [res, relabelled] = await Promise.all([
    lab.agent
      .post(url)
      .send({ instance, result })
      .then((r) => (order.push('shape'), r)),
    new Promise((resolve) => setTimeout(resolve, 300))
      .then(() => lab.agent.patch(`${url}/${box.body.id}`).send({ label: 'By box' }))
      .then((r) => (order.push('relabel'), r)),
  ]);
  expect(relabelled.status).toBe(200);
  expect(res.status).toBe(503);
  expect(res.body.error.code).toBe('shape_check_unavailable');
  expect(order).toEqual(['relabel', 'shape']);
  const plan = await lab.agent.get(url.replace(/\/layouts$/, ''));
  expect(plan.body.layouts.map((l: { label: string }) => l.label)).toEqual(['By box']);
});
