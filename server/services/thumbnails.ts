import { createHash } from 'node:crypto';
import type { Database } from '../db';
import { partsRepository } from '../db/repositories/parts';
import { notFound } from '../errors';
import type { FileStorage } from '../storage';
import type { ThumbnailJob } from '../mesh/protocol';
import type { PartsService } from './parts';

/** Pixels a side: sharp at the library's 48-64 px on a screen of twice the density. */
export const THUMBNAIL_PX = 128;
/** Raised when the drawing changes, so pictures drawn before are drawn again. */
const DRAWING_VERSION = 1;

export type DrawThumbnail = (job: ThumbnailJob) => Promise<Uint8Array | null>;

/**
 * A part's picture for the library, drawn from its stored mesh as stored
 * (turned by its rotation) in a mesh worker, and kept in the database by
 * file, part and turn: the second ask, on any server, reads it back.
 */
export function thumbnailsService(db: Database, deps: { storage: FileStorage; parts: PartsService; draw: DrawThumbnail }) {
  const repo = partsRepository(db);
  return {
    async png(labId: string, partId: string): Promise<{ png: Buffer; etag: string }> {
      // Lab-scoped: another lab's part (or none) answers 404 here.
      const part = await deps.parts.get(labId, partId);
      const view = `v${DRAWING_VERSION}:${THUMBNAIL_PX}:${part.file.partIndex}:${part.file.unit}:${part.file.split ? 1 : 0}:${part.rotationDeg.join(',')}`;
      const etag = createHash('sha256').update(part.file.sha256).update(view).digest('hex').slice(0, 32);
      const kept = await repo.thumbnail(part.file.sha256, view);
      if (kept) return { png: kept, etag };
      const bytes = await deps.storage.get(part.file.sha256);
      if (!bytes) throw notFound("That part's file");
      const png = await deps.draw({
        bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength),
        filename: part.file.name,
        unit: part.file.unit,
        split: part.file.split,
        partIndex: part.file.partIndex,
        rotationDeg: part.rotationDeg,
        sizePx: THUMBNAIL_PX,
      });
      if (!png) throw notFound("That part's picture");
      const out = Buffer.from(png.buffer, png.byteOffset, png.byteLength);
      // Two servers drawing the same picture at once keep the first; the file may also have gone meanwhile.
      await repo.keepThumbnail(part.file.sha256, view, out);
      return { png: out, etag };
    },
  };
}
export type ThumbnailsService = ReturnType<typeof thumbnailsService>;
