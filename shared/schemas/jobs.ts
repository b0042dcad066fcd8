import { z } from 'zod';
import { partViewSchema, rejectedFileSchema } from './parts';

/** Where a job of the mesh queue stands: waiting for a worker, being measured, finished with parts, or finished with none. */
export const JOB_STATES = ['queued', 'running', 'done', 'failed'] as const;
export const jobStateSchema = z.enum(JOB_STATES);
export type JobState = z.infer<typeof jobStateSchema>;

/** The answer of an upload that was not measured within the server's wait (202). */
export const jobAcceptedSchema = z.object({ job: z.object({ id: z.string(), state: jobStateSchema }) });
export type JobAccepted = z.infer<typeof jobAcceptedSchema>;

/**
 * `GET /api/labs/:labId/jobs/:jobId`. While the job is queued or running,
 * `files` says how far it is; once done, `parts` and `rejected` are the
 * lists an upload answers with at once (201); a failed job kept no part and
 * says why in `error`, with every refused file in `rejected`.
 */
export const jobViewSchema = z.object({
  job: z.object({
    id: z.string(),
    state: jobStateSchema,
    files: z.object({ total: z.number(), finished: z.number(), running: z.number() }),
    createdAt: z.string(),
    startedAt: z.string().nullable(),
    finishedAt: z.string().nullable(),
  }),
  parts: z.array(partViewSchema).optional(),
  rejected: z.array(rejectedFileSchema).optional(),
  error: z.object({ code: z.string(), message: z.string() }).optional(),
});
export type JobView = z.infer<typeof jobViewSchema>;
