/**
 * A kept layout is estimated from its parts' real shapes: the server reads the
 * parts' stored files, slices them in the mesh workers at the layout's layer
 * middles, and stores the per-layer areas with the estimate and where they
 * came from. Parts whose mesh has no defined sections count as their boxes,
 * with the reason.
 */
import { createHash, randomBytes } from 'node:crypto';
import { startTestApp } from '../helpers/app';
import { createPlan, gridLayout, labWithProfiles, planInstance } from '../helpers/plans';
import type { Running } from '../../server/boot';
import { demoLibrary, measureMesh, writeBinaryStl, type MeshData } from '../../shared/geometry';
import { estimateLayout } from '../../shared/estimate';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

/** A request with one line per mesh, written into the part library's tables with the mesh's STL as the stored file. */
async function requestOf(labId: string, userId: string, materialId: string, parts: { name: string; mesh: MeshData; quantity: number; watertight?: boolean }[]) {
  const q = (sql: string, bind: unknown[]) => running.db.sequelize.query(sql, { bind }) as Promise<[any[], unknown]>;
  const [[req]] = await q(
    `INSERT INTO requests (id, lab_id, title, material_id, due_date, priority, notes, status, created_by, created_at, updated_at)
     VALUES (gen_random_uuid(), $1, 'Shapes', $2, '2027-03-01', 'normal', '', 'open', $3, now(), now()) RETURNING id`,
    [labId, materialId, userId],
  );
  const lines: { id: string; quantity: number }[] = [];
  for (const [i, part] of parts.entries()) {
    const bytes = Buffer.from(writeBinaryStl(part.mesh, part.name));
    const m = measureMesh(part.mesh);
    const metrics = { ...m, watertight: part.watertight ?? m.watertight };
    const key = createHash('sha256').update(bytes).update(randomBytes(8)).digest('hex');
    await q(`INSERT INTO files (key, size_bytes, location, data, ref_count, created_at) VALUES ($1, $2, 'postgres', $3, 1, now())`, [key, bytes.length, bytes]);
    // Sizes as float32, as the STL stores the coordinates.
    const [[p]] = await q(
      `INSERT INTO parts (id, lab_id, name, tags, file_key, file_name, file_format, file_unit, file_split, file_part_index,
                          uploaded_size_mm, rotation_deg, size_x_mm, size_y_mm, size_z_mm, volume_mm3, area_mm2, triangles,
                          watertight, metrics, warnings, orientation, default_material_id, uploaded_by, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, '{}', $3, $4, 'stl', 'mm', false, 0, $5::double precision[], '{0,0,0}', $6, $7, $8, $9, $10, $11,
               $12, $13::jsonb, '[]'::jsonb, 'keep_up', $14, $15, now(), now()) RETURNING id`,
      [labId, part.name, key, `${part.name}.stl`, m.sizeMm, m.sizeMm[0], m.sizeMm[1], m.sizeMm[2], m.volumeMm3, m.areaMm2, m.triangles, metrics.watertight, JSON.stringify(metrics), materialId, userId],
    );
    const [[line]] = await q(
      `INSERT INTO request_lines (id, request_id, part_id, position, quantity, planned_count, printed_count, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, $3, $4, 0, 0, now(), now()) RETURNING id`,
      [req.id, p.id, i, part.quantity],
    );
    lines.push({ id: line.id, quantity: part.quantity });
  }
  return lines;
}

const library = demoLibrary();
const housing = library.find((p) => p.name === 'Controller housing')!.mesh;
const gear = library.find((p) => p.name === 'Drive gear 24T')!.mesh;

test('a layout of open housings and gears is estimated from their sections, far below their boxes', async () => {
  const lab = await labWithProfiles(running, 'shapes');
  const lines = await requestOf(lab.labId, lab.userId, lab.materialId, [
    { name: 'Housing', mesh: housing, quantity: 4 },
    { name: 'Gear', mesh: gear, quantity: 6 },
  ]);
  const plan = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, lines);
  const instance = planInstance(plan.view, lab.machine, lab.material);
  const result = gridLayout(instance);
  const res = await lab.agent.post(`/api/labs/${lab.labId}/plans/${plan.id}/layouts`).send({ instance, result });
  expect(res.status).toBe(201);
  expect(res.body.estimate.profileSource).toBe('mesh');
  expect(res.body.estimate.profileBoxPlacements).toBe(0);

  // Cavalieri: the stored sections times the layer height hold the parts' mesh volume (within the slicing error,
  // a few layers' worth of area here), where the boxes would hold several times more.
  const area: number[] = res.body.estimate.areaPerLayerMm2;
  expect(area).toHaveLength(result.layers);
  const h = instance.layerHeight!;
  const sliced = area.reduce((s, a) => s + a, 0) * h;
  const volume = 4 * measureMesh(housing).volumeMm3 + 6 * measureMesh(gear).volumeMm3;
  expect(Math.abs(sliced - volume) / volume).toBeLessThan(0.01);
  const boxes = estimateLayout({
    layout: { placements: result.placements, heightMm: result.height, margin: instance.margin as { xy: number; bottom: number; top: number } },
    machine: lab.machine,
    material: lab.material,
    layerHeightMm: h,
  });
  const boxVolume = Array.from(boxes.areaPerLayerMm2).reduce((s, a) => s + a, 0) * h;
  expect(sliced).toBeLessThan(0.5 * boxVolume);
  expect(res.body.estimate.print.printSeconds).toBeLessThan(boxes.print.printSeconds);
  // Kept beside it for the planner to compare: what the same layout counted as boxes reads.
  expect(res.body.estimate.byBoxes.printSeconds).toBeCloseTo(boxes.print.printSeconds, 6);
  expect(res.body.estimate.byBoxes.areaJumps).toBe(boxes.areaJumps.length);
});

test('a part whose mesh is not closed counts as its box, and the estimate says why', async () => {
  const lab = await labWithProfiles(running, 'openmesh');
  const open: MeshData = { positions: gear.positions, indices: gear.indices.slice(0, gear.indices.length - 3) };
  const lines = await requestOf(lab.labId, lab.userId, lab.materialId, [
    { name: 'Torn gear', mesh: open, quantity: 2, watertight: false },
    { name: 'Gear', mesh: gear, quantity: 2 },
  ]);
  const plan = await createPlan(lab.agent, lab.labId, lab.machineId, lab.materialId, lines);
  const instance = planInstance(plan.view, lab.machine, lab.material);
  const res = await lab.agent.post(`/api/labs/${lab.labId}/plans/${plan.id}/layouts`).send({ instance, result: gridLayout(instance) });
  expect(res.status).toBe(201);
  expect(res.body.estimate.profileSource).toBe('mesh');
  expect(res.body.estimate.profileBoxPlacements).toBe(2);
  expect(res.body.estimate.profileBoxParts).toEqual([{ name: 'Torn gear', reason: expect.stringContaining('not a closed') }]);
});
