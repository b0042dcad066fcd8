import { z } from 'zod';

export const LENGTH_UNITS = ['mm', 'cm', 'inch'] as const;
export const lengthUnitSchema = z.enum(LENGTH_UNITS);

/** any: the planner may turn the part freely; keep_up: only about the vertical axis; fixed: as uploaded. */
export const ORIENTATION_RULES = ['any', 'keep_up', 'fixed'] as const;
export const orientationRuleSchema = z.enum(ORIENTATION_RULES);

export const QUARTER_TURNS_DEG = [0, 90, 180, 270] as const;
const quarterTurnSchema = z.union([z.literal(0), z.literal(90), z.literal(180), z.literal(270)], {
  error: 'must be 0, 90, 180 or 270 (degrees)',
});
/** Degrees about x, then y, then z (fixed axes), in quarter turns, from the orientation as uploaded. */
export const rotationDegSchema = z.tuple([quarterTurnSchema, quarterTurnSchema, quarterTurnSchema]);

export const partNameSchema = z.string().trim().min(1, 'is required').max(200, 'must be at most 200 characters');
export const tagSchema = z.string().trim().min(1, 'must not be empty').max(40, 'must be at most 40 characters');
export const tagsSchema = z
  .array(tagSchema)
  .max(20, 'must be at most 20 tags')
  .transform((tags) => [...new Set(tags)]);

const uuid = z.uuid('must be an id');

/** Files per upload request: a folder's worth; larger sets go in several requests. */
export const MAX_FILES_PER_UPLOAD = 100;

/** The multipart upload's text fields (the files come as `file` fields). */
export const partUploadFieldsSchema = z.strictObject({
  unit: lengthUnitSchema.default('mm'),
  /** A 3MF with several build items: one part per item ("true", the default) or one merged part ("false"). */
  split: z.enum(['true', 'false']).default('true').transform((s) => s === 'true'),
});

export const partPatchSchema = z.strictObject({
  name: partNameSchema.optional(),
  tags: tagsSchema.optional(),
  defaultMaterialId: uuid.nullable().optional(),
  orientation: orientationRuleSchema.optional(),
  rotationDeg: rotationDegSchema.optional(),
});

export const PART_SORT_KEYS = ['name', 'sizeX', 'sizeY', 'sizeZ', 'volume', 'area', 'triangles', 'material', 'timesUsed', 'uploadedBy', 'createdAt'] as const;
const partSortSchema = z
  .string()
  .regex(new RegExp(`^-?(${PART_SORT_KEYS.join('|')})$`), `must be one of ${PART_SORT_KEYS.join(', ')}, with "-" in front for descending`);

export const pageSchema = z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').max(100_000).default(1);
export const pageSizeSchema = z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').max(200, 'must be at most 200').default(50);

export const partListQuerySchema = z.strictObject({
  /** Matches the name or any tag, ignoring case. */
  search: z.string().trim().max(200).optional(),
  sort: partSortSchema.default('-createdAt'),
  page: pageSchema,
  pageSize: pageSizeSchema,
  /** A material id, or "none" for parts without a default material. */
  materialId: z.union([uuid, z.literal('none')]).optional(),
  /** "any": parts with at least one warning; "none": parts without; or one warning code. */
  warnings: z.string().regex(/^[a-z-]{1,40}$/, 'must be "any", "none" or a warning code').optional(),
});

export type PartPatch = z.infer<typeof partPatchSchema>;
export type PartListQuery = z.infer<typeof partListQuerySchema>;
export type PartUploadFields = z.infer<typeof partUploadFieldsSchema>;
export type OrientationRule = (typeof ORIENTATION_RULES)[number];

// ---------------------------------------------------------------------------
// Answers (the server is typed by them, the client parses with them)

const vec3 = z.tuple([z.number(), z.number(), z.number()]);

export const partWarningSchema = z.object({ code: z.string(), message: z.string() });
export type PartWarning = z.infer<typeof partWarningSchema>;

/** A part as the API returns it. */
export const partViewSchema = z.object({
  id: z.string(),
  labId: z.string(),
  name: z.string(),
  tags: z.array(z.string()),
  /** After the stored rotation. */
  sizeMm: vec3,
  uploadedSizeMm: vec3,
  rotationDeg: vec3,
  orientation: z.enum(ORIENTATION_RULES),
  volumeMm3: z.number(),
  areaMm2: z.number(),
  triangles: z.number(),
  watertight: z.boolean(),
  shells: z.number(),
  openEdges: z.number(),
  nonManifoldEdges: z.number(),
  oriented: z.boolean(),
  warnings: z.array(partWarningSchema),
  materialId: z.string().nullable(),
  materialName: z.string().nullable(),
  timesUsed: z.number(),
  uploadedBy: z.object({ id: z.string(), name: z.string() }).nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  /** How to read the stored file for a preview: the same unit and split choice, then the part at `partIndex`. */
  file: z.object({
    name: z.string(),
    format: z.enum(['stl', 'obj', '3mf']),
    unit: z.enum(['mm', 'cm', 'inch']),
    split: z.boolean(),
    partIndex: z.number(),
    sizeBytes: z.number(),
    sha256: z.string(),
  }),
});
export type PartView = z.infer<typeof partViewSchema>;

export const rejectedFileSchema = z.object({ file: z.string(), code: z.string(), message: z.string() });
export type RejectedFile = z.infer<typeof rejectedFileSchema>;

export const partUploadResponseSchema = z.object({ parts: z.array(partViewSchema), rejected: z.array(rejectedFileSchema) });
export type PartUploadResponse = z.infer<typeof partUploadResponseSchema>;

export const partListResponseSchema = z.object({ items: z.array(partViewSchema), total: z.number() });
export type PartListResponse = z.infer<typeof partListResponseSchema>;

/** One file revision of a part; `current` is the newest, the one the library, new requests and new plans use. */
export const partRevisionViewSchema = z.object({
  partId: z.string(),
  revision: z.number().int(),
  current: z.boolean(),
  fileName: z.string(),
  sizeMm: z.tuple([z.number(), z.number(), z.number()]),
  volumeMm3: z.number(),
  watertight: z.boolean(),
  uploadedBy: z.object({ id: z.string(), name: z.string() }).nullable(),
  uploadedAt: z.string(),
  /** Plans (not cancelled or aborted) whose lines use this revision's file. */
  plans: z.array(z.object({ id: z.string(), name: z.string(), status: z.string() })),
});
export type PartRevisionView = z.infer<typeof partRevisionViewSchema>;
export const partRevisionsViewSchema = z.object({ partId: z.string(), newestPartId: z.string(), revisions: z.array(partRevisionViewSchema) });
export type PartRevisionsView = z.infer<typeof partRevisionsViewSchema>;
