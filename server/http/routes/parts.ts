import { Router, type ErrorRequestHandler, type RequestHandler } from 'express';
import multer from 'multer';
import { unlink } from 'node:fs/promises';
import { AppError, badRequest } from '../../errors';
import { MAX_FILES_PER_UPLOAD, partListQuerySchema, partPatchSchema, partUploadFieldsSchema } from '../../../shared/schemas/parts';
import { quoteName } from '../../../shared/geometry';
import { hasRole, labAccess } from '../middleware/auth';
import { requireLab } from '../context';
import { validate } from '../validate';
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

/**
 * The temp files of an upload refused before the parts service took them
 * (bad form fields, say) are removed before the error is answered.
 */
const discardUploadOnError: ErrorRequestHandler = async (err, req, _res, next) => {
  const files = (req.files as Express.Multer.File[] | undefined) ?? [];
  await Promise.all(files.map((f) => unlink(f.path).catch(() => {})));
  next(err);
};

export function partRoutes(deps: AppDeps): Router {
  const r = Router();
  const { labs, parts } = deps.services;
  const member = labAccess(labs);
  // Designers and planners upload; a lead may too, as the one who curates the library.
  const uploader = labAccess(labs, ['designer', 'planner', 'lead']);
  const uploadFields = validate(partUploadFieldsSchema);
  const listQuery = validate(partListQuerySchema, 'query');
  const patch = validate(partPatchSchema);

  const importUpload: RequestHandler = async (req, res) => {
    const { labId, user } = requireLab(req);
    const files = (req.files as Express.Multer.File[] | undefined) ?? [];
    // Measured on the job queue: 201 with the parts when done within the wait, else 202 with the job.
    // The temp files are gone before the answer.
    const out = await deps.services.meshJobs.upload(labId, user.id, files, uploadFields.input(req), deps.config.uploadWaitMs);
    res.status(out.status).json(out.body);
  };
  r.post('/labs/:labId/parts', uploader, uploadMiddleware(deps), uploadFields, importUpload, discardUploadOnError);

  // A new file for an existing part: its next revision (one file, never split).
  const addRevision: RequestHandler = async (req, res) => {
    const { labId, user } = requireLab(req);
    const files = (req.files as Express.Multer.File[] | undefined) ?? [];
    if (files.length > 1) throw badRequest("file: send one file, the part's new revision", 'file');
    res.status(201).json(await deps.services.partRevisions.upload(labId, String(req.params.partId), user.id, files[0], uploadFields.input(req).unit));
  };
  r.post('/labs/:labId/parts/:partId/revisions', uploader, uploadMiddleware(deps), uploadFields, addRevision, discardUploadOnError);
  r.get('/labs/:labId/parts/:partId/revisions', member, async (req, res) => {
    res.json(await deps.services.partRevisions.list(requireLab(req).labId, String(req.params.partId)));
  });
  r.get('/labs/:labId/parts', member, listQuery, async (req, res) => {
    res.json(await parts.list(requireLab(req).labId, listQuery.input(req)));
  });
  r.get('/labs/:labId/parts/:partId', member, async (req, res) => {
    res.json(await parts.get(requireLab(req).labId, String(req.params.partId)));
  });
  r.patch('/labs/:labId/parts/:partId', uploader, patch, async (req, res) => {
    res.json(await parts.update(requireLab(req).labId, String(req.params.partId), patch.input(req)));
  });
  r.delete('/labs/:labId/parts/:partId', member, async (req, res) => {
    const { labId, user } = requireLab(req);
    await parts.remove(labId, String(req.params.partId), { userId: user.id, isLead: hasRole(req, 'lead') });
    res.status(204).end();
  });
  r.get('/labs/:labId/parts/:partId/thumbnail.png', member, async (req, res) => {
    const { png, etag } = await deps.services.thumbnails.png(requireLab(req).labId, String(req.params.partId));
    res.setHeader('ETag', `"${etag}"`);
    // Kept by the browser but asked again each time: a turned part keeps its address and gets another tag.
    res.setHeader('Cache-Control', 'private, no-cache');
    if (req.headers['if-none-match'] === `"${etag}"`) return void res.status(304).end();
    res.type('image/png').send(png);
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
