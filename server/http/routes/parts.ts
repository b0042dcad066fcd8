import { Router, type Request, type RequestHandler } from 'express';
import multer from 'multer';
import { unlink } from 'node:fs/promises';
import { AppError, badRequest } from '../../errors';
import { MAX_FILES_PER_UPLOAD, partUploadFieldsSchema, type PartUploadResponse, type RejectedFile } from '../../../shared/schemas/parts';
import { quoteName } from '../../../shared/geometry';
import { hasRole, labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import { parseOrThrow } from '../../validation';
import type { AppDeps } from '../../app';
import { plainFileName } from '../../services/parts';


/**
 * Multipart upload streamed to temp files on disk (never whole in memory),
 * with multer's errors turned into the API's error shape.
 */
function uploadMiddleware(deps: AppDeps): RequestHandler {
  const limitMb = Math.round((deps.config.uploadLimitBytes / (1024 * 1024)) * 10) / 10;
  const upload = multer({
    storage: multer.diskStorage({ destination: deps.config.uploadTmpDir }),
    // Browsers send a file's name as UTF-8 bytes without saying so (WHATWG HTML, multipart/form-data encoding).
    defParamCharset: 'utf8',
    limits: { fileSize: deps.config.uploadLimitBytes, files: MAX_FILES_PER_UPLOAD, fields: 10, fieldSize: 1024, parts: MAX_FILES_PER_UPLOAD + 10 },
  }).array('file', MAX_FILES_PER_UPLOAD);
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      const e = err as { name?: string; code?: string; field?: string; filename?: string; syscall?: string };
      if (e.name !== 'MulterError') {
        // The multipart reader's own errors (no boundary, a body cut short, a malformed part) are the request's fault;
        // the disk's (a system call failed) are the server's.
        if (e.syscall || err instanceof AppError) return next(err);
        return next(new AppError(400, 'bad_upload', 'The upload could not be read: send the files as complete multipart/form-data (with its boundary) in fields named "file".'));
      }
      const name = e.filename ? quoteName(plainFileName(e.filename)) : 'A file';
      switch (e.code) {
        case 'LIMIT_FILE_SIZE':
          return next(new AppError(413, 'file_too_large', `${name} is larger than the upload limit of ${limitMb} MB; nothing was uploaded.`, 'file'));
        case 'LIMIT_FILE_COUNT':
        case 'LIMIT_PART_COUNT':
          return next(new AppError(400, 'too_many_files', `Upload at most ${MAX_FILES_PER_UPLOAD} files at a time; nothing was uploaded.`, 'file'));
        case 'LIMIT_UNEXPECTED_FILE':
          return next(badRequest(`Files go in fields named "file" (got "${String(e.field ?? '').slice(0, 40)}").`, e.field));
        default:
          return next(new AppError(400, 'bad_upload', 'The upload could not be read; send the files as multipart/form-data in fields named "file".'));
      }
    });
  };
}

export function partRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, parts } = deps.services;
  const member = labAccess(labs);
  // Designers and planners upload; a lead may too, as the one who curates the library.
  const uploader = labAccess(labs, ['designer', 'planner', 'lead']);

  r.post('/labs/:labId/parts', uploader, uploadMiddleware(deps), async (req, res) => {
    const files = (req.files as Express.Multer.File[] | undefined) ?? [];
    let out: PartUploadResponse;
    try {
      out = await importUploads(deps, req, files);
    } finally {
      // Before answering, so a client that sees the answer never sees the temp files.
      await Promise.all(files.map((f) => unlink(f.path).catch(() => {})));
    }
    res.status(201).json(out);
  });

  r.get('/labs/:labId/parts', member, async (req, res) => {
    res.json(await parts.list(requireLab(req).labId, { ...req.query }));
  });
  r.get('/labs/:labId/parts/:partId', member, async (req, res) => {
    res.json(await parts.get(requireLab(req).labId, String(req.params.partId)));
  });
  r.patch('/labs/:labId/parts/:partId', uploader, async (req, res) => {
    res.json(await parts.update(requireLab(req).labId, String(req.params.partId), req.body ?? {}));
  });
  r.delete('/labs/:labId/parts/:partId', member, async (req, res) => {
    const { labId, user } = requireLab(req);
    await parts.remove(labId, String(req.params.partId), { userId: user.id, isLead: hasRole(req, 'lead') });
    res.status(204).end();
  });
  r.get('/labs/:labId/parts/:partId/file', member, async (req, res) => {
    const file = await parts.file(requireLab(req).labId, String(req.params.partId));
    res.type(file.contentType);
    res.attachment(file.filename);
    // The bytes under a key never change, so the key is the entity tag.
    res.setHeader('ETag', `"${file.sha256}"`);
    res.setHeader('Cache-Control', 'private, max-age=86400');
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.send(file.bytes);
  });
  return r;
}

/** Measures and stores every file; throws when none could be kept. */
async function importUploads(deps: AppDeps, req: Request, files: Express.Multer.File[]): Promise<PartUploadResponse> {
  const { labId, user } = requireLab(req);
  const fields = parseOrThrow(partUploadFieldsSchema, { ...(req.body ?? {}) });
  if (files.length === 0) throw badRequest('Choose at least one file to upload (fields named "file").', 'file');
  // Measuring runs in parallel in the worker pool; each file stands alone.
  const results = await Promise.all(
    files.map((f) =>
      deps.services.parts.importFile({
        labId,
        userId: user.id,
        filename: f.originalname,
        source: { path: f.path, sizeBytes: f.size },
        unit: fields.unit,
        split: fields.split,
      }),
    ),
  );
  const out: PartUploadResponse = { parts: [], rejected: [] };
  const serverErrors: unknown[] = [];
  for (const result of results) {
    if (result.ok) out.parts.push(...result.parts);
    else {
      out.rejected.push(result.rejected);
      if (result.serverError) serverErrors.push(result.serverError);
    }
  }
  if (out.parts.length > 0) {
    for (const e of serverErrors) deps.log(`upload: a file was not saved: ${(e as Error)?.stack ?? String(e)}`);
    return out;
  }
  // Nothing kept: a server-side failure is the server's answer, not the files' fault.
  if (serverErrors.length > 0) throw serverErrors[0];
  throw allRejected(out.rejected);
}

function allRejected(rejected: RejectedFile[]): AppError {
  const message =
    rejected.length === 1 ? rejected[0].message : `None of the ${rejected.length} files could be used. ${rejected.map((x) => x.message).join(' ')}`;
  return new AppError(400, 'invalid_file', message, 'file', { rejected });
}
