import { z } from 'zod';
import { pageSchema, pageSizeSchema } from './parts';
import { PLAN_STATUSES } from '../plans/status';

export const PRIORITIES = ['low', 'normal', 'high', 'urgent'] as const;
export const prioritySchema = z.enum(PRIORITIES);
export const REQUEST_STATUSES = ['open', 'cancelled', 'done'] as const;
export const requestStatusSchema = z.enum(REQUEST_STATUSES);

export const QUANTITY_MAX = 100_000;
export const MAX_REQUEST_LINES = 500;

const uuid = z.uuid('must be an id');

/** A calendar date, YYYY-MM-DD; whether it is in the past is the server's call (it knows the date). */
export const dueDateSchema = z.iso.date('must be a date (YYYY-MM-DD)');

export const requestLineSchema = z.strictObject({
  partId: uuid,
  quantity: z
    .number({ error: 'must be a number' })
    .int('must be a whole number')
    .min(1, 'must be at least 1')
    .max(QUANTITY_MAX, `must be at most ${QUANTITY_MAX.toLocaleString('en-US')}`),
});

const linesSchema = z
  .array(requestLineSchema)
  .min(1, 'needs at least one part')
  .max(MAX_REQUEST_LINES, `must be at most ${MAX_REQUEST_LINES} lines`)
  .superRefine((lines, c) => {
    const seen = new Set<string>();
    lines.forEach((line, i) => {
      if (seen.has(line.partId)) c.addIssue({ code: 'custom', path: [i, 'partId'], message: 'lists the same part twice; raise its quantity instead' });
      seen.add(line.partId);
    });
  });

const titleSchema = z.string().trim().min(1, 'is required: give the request a short title').max(200, 'must be at most 200 characters');
const notesSchema = z.string().max(5000, 'must be at most 5,000 characters');

export const requestCreateSchema = z.strictObject({
  title: titleSchema,
  materialId: z.uuid("must be one of the lab's materials: choose one"),
  dueDate: dueDateSchema,
  priority: prioritySchema.default('normal'),
  notes: notesSchema.default(''),
  lines: linesSchema,
});

export const requestPatchSchema = z.strictObject({
  title: titleSchema.optional(),
  materialId: z.uuid("must be one of the lab's materials: choose one").optional(),
  dueDate: dueDateSchema.optional(),
  priority: prioritySchema.optional(),
  notes: notesSchema.optional(),
  /** Replaces every line. */
  lines: linesSchema.optional(),
  /** A designer may cancel or reopen; "done" is set when the parts are printed. */
  status: z.enum(['open', 'cancelled']).optional(),
});

export const REQUEST_SORT_KEYS = ['dueDate', 'priority', 'createdAt', 'title'] as const;

export const requestListQuerySchema = z.strictObject({
  status: z.union([requestStatusSchema, z.literal('all')]).default('all'),
  /** dueDate: soonest first, then most urgent (the planner's order); priority: most urgent first, then soonest. */
  sort: z
    .string()
    .regex(new RegExp(`^-?(${REQUEST_SORT_KEYS.join('|')})$`), `must be one of ${REQUEST_SORT_KEYS.join(', ')}, with "-" in front to reverse`)
    .default('dueDate'),
  search: z.string().trim().max(200).optional(),
  page: pageSchema,
  pageSize: pageSizeSchema,
});

export type RequestCreate = z.infer<typeof requestCreateSchema>;
export type RequestPatch = z.infer<typeof requestPatchSchema>;
export type RequestListQuery = z.infer<typeof requestListQuerySchema>;
export type Priority = (typeof PRIORITIES)[number];

// ---------------------------------------------------------------------------
// Answers (the server is typed by them, the client parses with them)

export const requestLineViewSchema = z.object({
  id: z.string(),
  partId: z.string(),
  partName: z.string(),
  quantity: z.number(),
  /** In builds (waiting, under way or done): parts not counted good at a breakout come off again. */
  plannedCount: z.number(),
  /** Counted good in builds that are done. */
  printedCount: z.number(),
  /** Counted failed at breakouts (they were given back to plan again). */
  failedCount: z.number(),
  /** quantity - printed. */
  stillToMakeCount: z.number(),
  /** quantity - planned: what a planner can still put in a build. */
  openCount: z.number(),
});
export type RequestLineView = z.infer<typeof requestLineViewSchema>;

/** A build holding some of a request's parts; readyAt: the queue's predicted breakout end, or when it was done. */
export const requestBuildViewSchema = z.object({
  planId: z.string(),
  planName: z.string(),
  status: z.enum(PLAN_STATUSES),
  machine: z.object({ id: z.string(), name: z.string() }),
  materialName: z.string().nullable(),
  readyAt: z.string().nullable(),
  lines: z.array(z.object({ requestLineId: z.string(), quantity: z.number(), goodCount: z.number().nullable(), failedCount: z.number().nullable() })),
});
export type RequestBuildView = z.infer<typeof requestBuildViewSchema>;

export const requestViewSchema = z.object({
  id: z.string(),
  labId: z.string(),
  title: z.string(),
  materialId: z.string().nullable(),
  materialName: z.string().nullable(),
  dueDate: z.string(),
  priority: z.enum(PRIORITIES),
  notes: z.string(),
  status: z.enum(REQUEST_STATUSES),
  createdBy: z.object({ id: z.string(), name: z.string() }).nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  lines: z.array(requestLineViewSchema),
  totals: z.object({ quantity: z.number(), planned: z.number(), printed: z.number(), failed: z.number(), stillToMake: z.number() }),
  /** Only on a single request (GET .../requests/:id). */
  builds: z.array(requestBuildViewSchema).optional(),
  /** True once any line has a planned count: the request can no longer be edited. */
  planned: z.boolean(),
});
export type RequestView = z.infer<typeof requestViewSchema>;

export const requestListResponseSchema = z.object({ items: z.array(requestViewSchema), total: z.number() });
export type RequestListResponse = z.infer<typeof requestListResponseSchema>;
