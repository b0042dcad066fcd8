import type { z } from 'zod';
import type { Database } from '../db';
import { conflict, notFound } from '../errors';
import { parseOrThrow } from '../validation';
import type { Stored } from '../../shared/schemas/profiles';

type ProfileModel = Database['models']['Machine'];
export type { Stored };

function view<P>(row: any): Stored<P> {
  return {
    id: row.id,
    labId: row.labId,
    ...row.profile,
    name: row.name,
    createdAt: new Date(row.created_at ?? row.createdAt).toISOString(),
    updatedAt: new Date(row.updated_at ?? row.updatedAt).toISOString(),
  };
}

/**
 * Machines and materials share one shape: a name unique in the lab plus a
 * profile checked by its shared schema. `what` names the thing in messages.
 * `checked` is the schema with its physical-sense checks (a whole profile is
 * checked by it; a patch first by the plain schema's partial, then merged and
 * checked whole).
 */
export function profilesService<S extends z.ZodObject<any>>(db: Database, model: ProfileModel, schema: S, what: string, checked: z.ZodType<z.infer<S>>) {
  type P = z.infer<S>;
  const partial = schema.partial();

  async function save(labId: string, row: any | null, profile: P) {
    const { name, ...rest } = profile as P & { name: string };
    try {
      if (row) return view<P>((await row.update({ name, profile: rest })).get({ plain: true }));
      return view<P>((await model.create({ labId, name, profile: rest })).get({ plain: true }));
    } catch (err) {
      if ((err as { name?: string }).name === 'SequelizeUniqueConstraintError') {
        throw conflict('name_taken', `This lab already has a ${what} named "${name}".`, 'name');
      }
      throw err;
    }
  }

  async function find(labId: string, id: string) {
    const row = await model.findOne({ where: { id, labId } });
    if (!row) throw notFound(`That ${what}`);
    return row;
  }

  return {
    /** What a new one must be (with its physical-sense checks), and what a change may hold (routes check requests with these). */
    schema: checked,
    patchSchema: partial,
    async list(labId: string): Promise<Stored<P>[]> {
      const rows = await model.findAll({ where: { labId }, order: [['name', 'ASC']], raw: true });
      return rows.map((r) => view<P>(r));
    },
    async get(labId: string, id: string): Promise<Stored<P>> {
      return view<P>((await find(labId, id)).get({ plain: true }));
    },
    async create(labId: string, profile: P): Promise<Stored<P>> {
      return save(labId, null, profile);
    },
    async update(labId: string, id: string, patch: Partial<P>): Promise<Stored<P>> {
      const row: any = await find(labId, id);
      const current = { name: row.name, ...row.profile };
      // Checked whole again, with the physical-sense rules: a change to one field can break a rule that spans several.
      return save(labId, row, parseOrThrow(checked, { ...current, ...patch }));
    },
    async remove(labId: string, id: string): Promise<void> {
      const row = await find(labId, id);
      try {
        await row.destroy();
      } catch (err) {
        // Build plans keep their machine and material for good (their history and estimates name them).
        if ((err as { name?: string }).name === 'SequelizeForeignKeyConstraintError') {
          throw conflict('in_use', `This ${what} is used by build plans, so it cannot be deleted; keep it, or rename it to show it is retired.`);
        }
        throw err;
      }
    },
  };
}
export type ProfilesService = ReturnType<typeof profilesService>;
