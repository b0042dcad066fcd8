import type { Transaction } from 'sequelize';
import type { Database } from '..';
import type { Services } from '../../app';
import { buildInstance, defaultOptions } from '../../../shared/plans/instance';
import { packSync, parseInstance } from '../../../shared/packing';
import { demoMachines, demoMaterials } from '../../../shared/demo/profiles';
import { ROLES, type Role } from '../../../shared/schemas/auth';
import { demoLibrary, translation, write3mf, writeAsciiStl, writeBinaryStl, type DemoPart } from '../../../shared/geometry';
import type { Priority } from '../../../shared/schemas/requests';
import { layoutCreateSchema, openLinesQuerySchema, planCreateSchema } from '../../../shared/schemas/plans';

/**
 * The demo lab: an invented robotics start-up's prototyping lab. Every demo
 * member signs in with the same password; the README lists them.
 */
import { seedPowderHistory } from './powder';

export const DEMO_LAB_NAME = 'Tinkerfin Robotics – prototyping lab';
export const DEMO_PASSWORD = 'sinter-demo-2026';
export const DEMO_MEMBERS: { email: string; name: string; roles: Role[] }[] = [
  { email: 'owner@tinkerfin.example', name: 'Demo Owner (all roles)', roles: [...ROLES] },
  { email: 'lead@tinkerfin.example', name: 'Demo Lead', roles: ['lead'] },
  { email: 'planner@tinkerfin.example', name: 'Demo Planner', roles: ['planner'] },
  { email: 'designer@tinkerfin.example', name: 'Demo Designer', roles: ['designer'] },
  { email: 'operator@tinkerfin.example', name: 'Demo Operator', roles: ['operator'] },
];

/** Seeds the demo lab when the database holds no lab yet; returns whether it did. */
export async function seedDemoIfEmpty(db: Database, services: Services, opts: { planInReview?: boolean } = {}): Promise<boolean> {
  const labs = await db.models.Lab.count();
  if (labs > 0) return false;
  await db.sequelize.transaction(async (t) => {
    const [owner, ...others] = DEMO_MEMBERS;
    const ownerId = await services.auth.createUser({ ...owner, password: DEMO_PASSWORD }, t);
    const labId = await services.labs.createLab(DEMO_LAB_NAME, ownerId, t);
    const ids = new Map<string, string>([[owner.email, ownerId]]);
    for (const m of others) {
      const id = await services.auth.createUser({ ...m, password: DEMO_PASSWORD }, t);
      await services.labs.addMember(labId, id, m.roles, t);
      ids.set(m.email, id);
    }
    for (const machine of demoMachines) {
      const { name, ...profile } = machine;
      await db.models.Machine.create({ labId, name, profile }, { transaction: t });
    }
    const materialIds: string[] = [];
    for (const material of demoMaterials) {
      const { name, ...profile } = material;
      const row = await db.models.Material.create({ labId, name, profile }, { transaction: t });
      materialIds.push(row.get('id') as string);
    }
    const designerId = ids.get('designer@tinkerfin.example') ?? ownerId;
    const partIds = await seedPartLibrary(db, services, labId, designerId, materialIds[0], t);
    await seedRequests(db, labId, designerId, materialIds, partIds, t);
  });
  // `npm start` adds a plan waiting for review; the test database leaves the
  // requests open, because browser tests plan them themselves.
  if (opts.planInReview) {
    await seedPlanInReview(db, services);
    // A powder history for the lab `npm start` shows; the test database starts without one, so its builds check no stock.
    const lead = await db.models.User.findOne({ where: { email: 'lead@tinkerfin.example' }, raw: true });
    const operator = await db.models.User.findOne({ where: { email: 'operator@tinkerfin.example' }, raw: true });
    const lab = await db.models.Lab.findOne({ where: { name: DEMO_LAB_NAME }, raw: true });
    if (lead && operator && lab) {
      await seedPowderHistory(db, (lab as unknown as { id: string }).id, {
        lead: (lead as unknown as { id: string }).id,
        operator: (operator as unknown as { id: string }).id,
      });
    }
  }
  return true;
}

/**
 * One plan waiting for the lead: the planner packed the most urgent request
 * on the larger machine and sent it for review, so a fresh demo shows review,
 * queue and the machine floor end to end. It goes through the same services
 * (and the same layout checks) as the editor's requests.
 */
export async function seedPlanInReview(db: Database, services: Services) {
  const lab = await db.models.Lab.findOne({ where: { name: DEMO_LAB_NAME }, raw: true });
  const planner = await db.models.User.findOne({ where: { email: 'planner@tinkerfin.example' }, raw: true });
  if (!lab || !planner) return;
  const actor = { id: planner.id, name: planner.name, email: planner.email };
  const machines = await services.machines.list(lab.id);
  const machine = machines.find((m) => m.chamberCount > 1) ?? machines[0];
  const open = await services.plans.openLines(lab.id, openLinesQuerySchema.parse({}));
  const first = open[0];
  if (!machine || !first || !first.request.materialId) return;
  const lines = open.filter((l) => l.request.id === first.request.id);
  const material = await services.materials.get(lab.id, first.request.materialId);
  // Checked with the routes' schemas, as the editor's requests are.
  const created = await services.plans.create(
    lab.id,
    actor,
    planCreateSchema.parse({
      name: `${first.request.title} on ${machine.name}`,
      machineId: machine.id,
      materialId: material.id,
      lines: lines.map((l) => ({ requestLineId: l.requestLineId, quantity: l.remaining })),
    }),
  );
  const plan = await services.plans.get(lab.id, created.id);
  const instance = buildInstance(
    plan.lines.map((l) => ({ requestLineId: l.requestLineId, quantity: l.quantity, orientation: l.orientation, sizeMm: l.part.sizeMm })),
    machine,
    material,
    { ...defaultOptions(machine, material), timeLimitMs: 1500 },
  );
  const parsed = parseInstance(instance);
  if (!parsed.ok) throw new Error(`demo plan: ${parsed.problems[0].field} ${parsed.problems[0].message}`);
  const result = packSync(parsed.instance);
  const layout = await services.layouts.add(lab.id, created.id, actor, layoutCreateSchema.parse({ instance: parsed.instance, result, label: 'Seed 1' }));
  await services.layouts.choose(lab.id, created.id, layout.id, actor);
  await services.plans.submit(lab.id, created.id, actor, null);
}

/** How each demo shape is filed: the way a designer's tools would have written it. */
function demoFiles(library: DemoPart[]): { filename: string; bytes: Uint8Array; parts: DemoPart[] }[] {
  const files: { filename: string; bytes: Uint8Array; parts: DemoPart[] }[] = [];
  const slug = (name: string) => name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
  const hinges = library.filter((p) => p.kind === 'hinge');
  for (const part of library) {
    if (part.kind === 'hinge') continue;
    if (part.kind === 'housing') {
      const bytes = write3mf([{ name: part.name, ...part.mesh }], [{ objectIndex: 0, transform: translation(0, 0, 0) }]);
      files.push({ filename: `${slug(part.name)}.3mf`, bytes, parts: [part] });
    } else if (part.kind === 'cable-guide') {
      files.push({ filename: `${part.name}.stl`, bytes: writeAsciiStl(part.mesh, slug(part.name)), parts: [part] });
    } else {
      files.push({ filename: `${part.name}.stl`, bytes: writeBinaryStl(part.mesh, `${part.name} (demo)`), parts: [part] });
    }
  }
  // Both hinge leaves in one package, side by side: the upload splits it into two parts.
  if (hinges.length > 0) {
    const bytes = write3mf(
      hinges.map((h) => ({ name: h.name, ...h.mesh })),
      hinges.map((_h, i) => ({ objectIndex: i, transform: translation(i * 80, 0, 0) })),
    );
    files.push({ filename: 'hinge-set.3mf', bytes, parts: hinges });
  }
  return files;
}

/**
 * The demo part library, made by the project's own shape generators and
 * filed through the same import as an upload: measured in the worker pool,
 * stored through the storage module. Returns part ids by name.
 */
async function seedPartLibrary(
  db: Database,
  services: Services,
  labId: string,
  designerId: string,
  materialId: string,
  t: Transaction,
): Promise<Map<string, string>> {
  const byName = new Map<string, string>();
  for (const file of demoFiles(demoLibrary())) {
    const result = await services.parts.importFile(
      { labId, userId: designerId, filename: file.filename, source: { bytes: file.bytes }, unit: 'mm', split: true },
      t,
    );
    if (!result.ok) throw new Error(`demo part library: ${result.rejected.message}`);
    for (const part of result.parts) {
      const demo = file.parts.find((p) => p.name === part.name) ?? file.parts[0];
      await db.models.Part.update(
        { name: demo.name, tags: ['demo', demo.kind], defaultMaterialId: materialId, orientation: demo.kind === 'housing' ? 'keep_up' : 'any' },
        { where: { id: part.id }, transaction: t },
      );
      byName.set(demo.name, part.id);
    }
  }
  return byName;
}

const DAY_MS = 86_400_000;

/** A few requests from the demo designer, due over the coming weeks. */
async function seedRequests(
  db: Database,
  labId: string,
  designerId: string,
  materialIds: string[],
  partIds: Map<string, string>,
  t: Transaction,
) {
  const requests: { title: string; material: number; inDays: number; priority: Priority; notes: string; lines: [string, number][] }[] = [
    {
      title: 'Gripper v3 prototypes',
      material: 0,
      inDays: 5,
      priority: 'high',
      notes: 'Two gripper arms for the spring demo; gears need a clean bore.',
      lines: [['Motor bracket 40', 12], ['Tube clip 12', 40], ['Drive gear 24T', 6], ['Idler gear 16T', 6]],
    },
    {
      title: 'Sensor rig housings',
      material: 0,
      inDays: 12,
      priority: 'normal',
      notes: 'Housings keep their open side up.',
      lines: [['Controller housing', 4], ['Sensor bracket 25', 8], ['Cable guide 8', 30]],
    },
    {
      title: 'Field repair kit',
      material: Math.min(1, materialIds.length - 1),
      inDays: 2,
      priority: 'urgent',
      notes: 'Spares for the rover that came back from the field trial.',
      lines: [['Lid hinge leaf', 10], ['Arm hinge leaf', 10], ['Tube clip 20', 24]],
    },
    {
      title: 'Sorting cups for the assembly bench',
      material: 0,
      inDays: 16,
      priority: 'low',
      notes: 'Thin-walled cups: they sink into each other, so a build packed by shape holds many.',
      lines: [['Sorting cup 52', 36]],
    },
  ];
  for (const r of requests) {
    const row = await db.models.Request.create(
      {
        labId,
        title: r.title,
        materialId: materialIds[r.material],
        dueDate: new Date(Date.now() + r.inDays * DAY_MS).toISOString().slice(0, 10),
        priority: r.priority,
        notes: r.notes,
        status: 'open',
        createdBy: designerId,
      },
      { transaction: t },
    );
    const lines = r.lines.flatMap(([name, quantity]) => {
      const partId = partIds.get(name);
      return partId ? [{ partId, quantity }] : [];
    });
    await db.models.RequestLine.bulkCreate(
      lines.map(({ partId, quantity }, position) => ({
        requestId: row.id,
        partId,
        position,
        quantity,
        plannedCount: 0,
        printedCount: 0,
      })),
      { transaction: t },
    );
  }
}
