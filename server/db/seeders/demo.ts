import type { Transaction } from 'sequelize';
import type { Database } from '..';
import type { Services } from '../../app';
import { demoMachines, demoMaterials } from '../../../shared/demo/profiles';
import { ROLES, type Role } from '../../../shared/schemas/auth';
import { demoLibrary, translation, write3mf, writeAsciiStl, writeBinaryStl, type DemoPart } from '../../../shared/geometry';
import type { Priority } from '../../../shared/schemas/requests';

/**
 * The demo lab: an invented robotics start-up's prototyping lab. Every demo
 * member signs in with the same password; the README lists them.
 */
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
export async function seedDemoIfEmpty(db: Database, services: Services): Promise<boolean> {
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
  return true;
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
    const lines = r.lines.filter(([name]) => partIds.has(name));
    await db.models.RequestLine.bulkCreate(
      lines.map(([name, quantity], position) => ({
        requestId: row.get('id'),
        partId: partIds.get(name),
        position,
        quantity,
        plannedCount: 0,
        printedCount: 0,
      })),
      { transaction: t },
    );
  }
}
