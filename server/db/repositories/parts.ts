import type { Database } from '../index';

const FOREIGN_KEY = 'SequelizeForeignKeyConstraintError';

/** The part library's kept pictures (plain bytes, never ORM instances). */
export function partsRepository(db: Database) {
  const { PartThumbnail } = db.models;
  return {
    async thumbnail(fileKey: string, view: string): Promise<Buffer | null> {
      const row = await PartThumbnail.findOne({ where: { fileKey, view }, attributes: ['png'] });
      return row ? row.png : null;
    },

    /** Keeps a picture: when two servers draw the same one at once the first stays, and a file removed meanwhile keeps none. */
    async keepThumbnail(fileKey: string, view: string, png: Buffer): Promise<void> {
      try {
        await PartThumbnail.bulkCreate([{ fileKey, view, png }], { ignoreDuplicates: true });
      } catch (err) {
        if ((err as { name?: string }).name !== FOREIGN_KEY) throw err;
      }
    },
  };
}
export type PartsRepository = ReturnType<typeof partsRepository>;
