import { RULE_ORIENTATIONS } from '../../shared/plans/instance';
import { createHash, randomBytes } from 'node:crypto';
import { measureMesh, prism, writeBinaryStl, type MeshData } from '../../shared/geometry';
import type { Running } from '../../server/boot';
import { addMember, signUp } from './app';
import { demoMachines, demoMaterials } from '../../shared/demo/profiles';
import {
  INSTANCE_FORMAT,
  parseInstance,
  summariseLayout,
  usableRegion,
  type PackInstance,
  type PackInstanceInput,
  type PackResult,
  type Placement,
} from '../../shared/packing';

type Agent = Awaited<ReturnType<typeof signUp>>['agent'];

/** A lead's new lab with one machine and one material made through the API. */
export async function labWithProfiles(running: Running, tag: string) {
  const owner = await signUp(running, tag);
  const machine = { ...demoMachines[1], name: `Machine of ${tag}` };
  const material = { ...demoMaterials[0], name: `Powder of ${tag}` };
  const m = await owner.agent.post(`/api/labs/${owner.labId}/machines`).send(machine);
  const mt = await owner.agent.post(`/api/labs/${owner.labId}/materials`).send(material);
  if (m.status !== 201 || mt.status !== 201) throw new Error(`profiles failed: ${m.status} ${mt.status}`);
  return { ...owner, machineId: m.body.id as string, materialId: mt.body.id as string, machine, material };
}

/** A part as its box of `sizeMm`, or as `mesh` (whose bounding box starts at the origin and measures `sizeMm`). */
export type FixturePart = { name: string; sizeMm: [number, number, number]; quantity: number; orientation?: 'any' | 'keep_up' | 'fixed'; mesh?: MeshData };

/**
 * A request with one line per part, written straight into the tables the
 * part library and the requests use (the mesh bytes are a stand-in: plans
 * read only the measured sizes and volumes).
 */
export async function makeRequest(
  running: Running,
  labId: string,
  userId: string,
  materialId: string,
  parts: FixturePart[],
  opts: { title?: string; dueDate?: string; priority?: string; status?: string } = {},
) {
  const q = (sql: string, bind: unknown[]) => running.db.sequelize.query(sql, { bind }) as Promise<[any[], unknown]>;
  const [[req]] = await q(
    `INSERT INTO requests (id, lab_id, title, material_id, due_date, priority, notes, status, created_by, created_at, updated_at)
     VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, '', $6, $7, now(), now()) RETURNING id`,
    [labId, opts.title ?? 'Fixture request', materialId, opts.dueDate ?? '2027-03-01', opts.priority ?? 'normal', opts.status ?? 'open', userId],
  );
  const lines: Array<{ id: string; partId: string; quantity: number; sizeMm: [number, number, number]; name: string }> = [];
  for (const [i, part] of parts.entries()) {
    // A real box: its STL is what the 3D views and the 3MF export read, its
    // measured metrics what the part library shows.
    const [x, y, z] = part.sizeMm;
    const mesh = part.mesh ?? prism([[0, 0], [x, 0], [x, y], [0, y]], 0, z);
    const bytes = Buffer.from(writeBinaryStl(mesh, part.name));
    const metrics = measureMesh(mesh);
    const key = createHash('sha256').update(bytes).update(randomBytes(8)).digest('hex');
    await q(`INSERT INTO files (key, size_bytes, location, data, ref_count, created_at) VALUES ($1, $2, 'postgres', $3, 1, now())`, [key, bytes.length, bytes]);
    const [[p]] = await q(
      `INSERT INTO parts (id, lab_id, name, tags, file_key, file_name, file_format, file_unit, file_split, file_part_index,
                          uploaded_size_mm, rotation_deg, size_x_mm, size_y_mm, size_z_mm, volume_mm3, area_mm2, triangles,
                          watertight, metrics, warnings, orientation, default_material_id, uploaded_by, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, '{}', $3, $4, 'stl', 'mm', false, 0, $5::double precision[], '{0,0,0}', $6, $7, $8, $9, $10, $11,
               $16, $12::jsonb, '[]'::jsonb, $13, $14, $15, now(), now()) RETURNING id`,
      [labId, part.name, key, `${part.name}.stl`, [x, y, z], x, y, z, metrics.volumeMm3, metrics.areaMm2, metrics.triangles, JSON.stringify(metrics), part.orientation ?? 'any', materialId, userId, metrics.watertight],
    );
    const [[line]] = await q(
      `INSERT INTO request_lines (id, request_id, part_id, position, quantity, planned_count, printed_count, created_at, updated_at)
       VALUES (gen_random_uuid(), $1, $2, $3, $4, 0, 0, now(), now()) RETURNING id`,
      [req.id, p.id, i, part.quantity],
    );
    lines.push({ id: line.id, partId: p.id, quantity: part.quantity, sizeMm: part.sizeMm, name: part.name });
  }
  return { requestId: req.id as string, lines };
}


/** The packing instance of a plan as the editor builds it: machine chamber, material spacing and margins, one part per line. */
export function planInstance(
  plan: { lines: Array<{ requestLineId: string; quantity: number; orientation: string; part: { sizeMm: [number, number, number] } }> },
  machine: { chamberMm: [number, number, number] },
  material: { spacingMm: number; marginXyMm: number; marginBottomMm: number; marginTopMm: number; defaultLayerHeightMm: number },
): PackInstanceInput {
  return {
    format: INSTANCE_FORMAT,
    chamber: machine.chamberMm,
    margin: { xy: material.marginXyMm, bottom: material.marginBottomMm, top: material.marginTopMm },
    spacing: material.spacingMm,
    layerHeight: material.defaultLayerHeightMm,
    objective: 'min-height',
    timeLimitMs: 1000,
    seed: 7,
    parts: plan.lines.map((l) => ({ id: l.requestLineId, size: l.part.sizeMm, quantity: l.quantity, orientations: [...RULE_ORIENTATIONS[l.orientation as keyof typeof RULE_ORIENTATIONS]] })),
  };
}

/**
 * A valid layout without the engine: every box in its own orientation on a
 * grid with the instance's spacing, layer after layer, counted by the same
 * summary the engine uses.
 */
export function gridLayout(input: PackInstanceInput): PackResult {
  const parsed = parseInstance(input);
  if (!parsed.ok) throw new Error(parsed.problems.map((p) => `${p.field} ${p.message}`).join('; '));
  const inst: PackInstance = parsed.instance;
  const { min, max } = usableRegion(inst);
  const g = inst.spacing;
  const placements: Placement[] = [];
  let x = min[0];
  let y = min[1];
  let z = min[2];
  let rowDepth = 0;
  let layerHeight = 0;
  for (const part of inst.parts) {
    const [sx, sy, sz] = part.size;
    for (let k = 0; k < part.quantity; k++) {
      if (x + sx > max[0]) {
        x = min[0];
        y += rowDepth + g;
        rowDepth = 0;
      }
      if (y + sy > max[1]) {
        y = min[1];
        z += layerHeight + g;
        layerHeight = 0;
      }
      if (z + sz > max[2]) throw new Error('the grid does not fit the chamber');
      placements.push({ id: part.id, position: [x, y, z], size: [sx, sy, sz], orientation: 'xyz' });
      x += sx + g;
      rowDepth = Math.max(rowDepth, sy);
      layerHeight = Math.max(layerHeight, sz);
    }
  }
  return summariseLayout(inst, placements, 12);
}

/** Creates a plan of every line of a fixture request; returns its id and view. */
export async function createPlan(lead: Agent, labId: string, machineId: string, materialId: string, lines: Array<{ id: string; quantity: number }>, name = 'Plan') {
  const res = await lead.post(`/api/labs/${labId}/plans`).send({ name, machineId, materialId, lines: lines.map((l) => ({ requestLineId: l.id, quantity: l.quantity })) });
  if (res.status !== 201) throw new Error(`plan create failed: ${res.status} ${JSON.stringify(res.body)}`);
  const view = await lead.get(`/api/labs/${labId}/plans/${res.body.id}`);
  return { id: res.body.id as string, view: view.body };
}

export const GEAR: FixturePart = { name: 'Gear', sizeMm: [30, 30, 8], quantity: 40 };

/** A lab whose planner (not a lead) has sent `count` plans on one machine for review. */
export async function sentForReview(running: Running, tag: string, count = 1) {
  const lab = await labWithProfiles(running, tag);
  const planner = await addMember(running, lab.agent, lab.labId, ['planner'], 'planner');
  const req = await makeRequest(running, lab.labId, lab.userId, lab.materialId, [GEAR]);
  const ids: string[] = [];
  for (let i = 0; i < count; i++) {
    const plan = await createPlan(planner.agent, lab.labId, lab.machineId, lab.materialId, [{ id: req.lines[0].id, quantity: 10 }], `Plan ${i + 1}`);
    const base = `/api/labs/${lab.labId}/plans/${plan.id}`;
    const instance = planInstance(plan.view, lab.machine, lab.material);
    const layout = await planner.agent.post(`${base}/layouts`).send({ instance, result: gridLayout(instance) });
    await planner.agent.post(`${base}/layouts/${layout.body.id}/choose`);
    const sent = await planner.agent.post(`${base}/submit`);
    if (sent.status !== 200) throw new Error(`submit failed: ${JSON.stringify(sent.body)}`);
    ids.push(plan.id);
  }
  return { ...lab, planner, ids };
}
