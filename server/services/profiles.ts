import type { z } from 'zod';
import { conflict, notFound } from '../errors';
import { parseOrThrow } from '../validation';
import type { Stored } from '../../shared/schemas/profiles';
import type { Database } from '../db';
import { profilesRepository, type ProfileRecord, type ProfileTable } from '../db/repositories/profiles';

export type { Stored };

function view<P>(row: ProfileRecord): Stored<P> {
  return {
    id: row.id,
    labId: row.labId,
    ...(row.profile as P),
    name: row.name,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/**
 * Machines and materials share one shape: a name unique in the lab plus a
 * profile checked by its shared schema. `what` names the thing in messages.
 * `checked` is the schema with its physical-sense checks (a whole profile is
 * checked by it; a patch first by the plain schema's partial, then merged and
 * checked whole).
 */
export function profilesService<S extends z.ZodObject>(db: Database, table: ProfileTable, schema: S, what: string, checked: z.ZodType<z.infer<S>>) {
  type P = z.infer<S>;
  const repo = profilesRepository(db, table);
  const partial = schema.partial();

  async function save(labId: string, id: string | null, profile: P): Promise<Stored<P>> {
    const { name, ...rest } = profile as P & { name: string };
    try {
      if (id === null) return view<P>(await repo.create(labId, name, rest));
      const changed = await repo.update(labId, id, name, rest);
      if (!changed) throw notFound(`That ${what}`);
      return view<P>(changed);
    } catch (err) {
      if ((err as { name?: string }).name === 'SequelizeUniqueConstraintError') {
        throw conflict('name_taken', `This lab already has a ${what} named "${name}".`, 'name');
      }
      throw err;
    }
  }

  async function find(labId: string, id: string): Promise<ProfileRecord> {
    const row = await repo.find(labId, id);
    if (!row) throw notFound(`That ${what}`);
    return row;
  }

  return {
    /** What a new one must be (with its physical-sense checks), and what a change may hold (routes check requests with these). */
    schema: checked,
    patchSchema: partial,
    async list(labId: string): Promise<Stored<P>[]> {
      return (await repo.list(labId)).map((r) => view<P>(r));
    },
    async get(labId: string, id: string): Promise<Stored<P>> {
      return view<P>(await find(labId, id));
    },
    async create(labId: string, profile: P): Promise<Stored<P>> {
      return save(labId, null, profile);
    },
    async update(labId: string, id: string, patch: Partial<P>): Promise<Stored<P>> {
      const row = await find(labId, id);
      const current = { name: row.name, ...row.profile };
      // Checked whole again, with the physical-sense rules: a change to one field can break a rule that spans several.
      return save(labId, id, parseOrThrow(checked, { ...current, ...patch }));
    },
    async remove(labId: string, id: string): Promise<void> {
      try {
        if (!(await repo.remove(labId, id))) throw notFound(`That ${what}`);
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
