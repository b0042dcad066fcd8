import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import type { PartPatch } from '../../shared/schemas/parts';
import { api } from '../api/client';

/** Response shapes of the part routes, parsed at the client's edge. */
const id = z.union([z.string(), z.number()]).transform((v) => String(v));
const vec3 = z.tuple([z.number(), z.number(), z.number()]);

export const partWarningSchema = z.object({ code: z.string(), message: z.string() });

export const partSchema = z.object({
  id,
  labId: id,
  name: z.string(),
  tags: z.array(z.string()),
  sizeMm: vec3,
  uploadedSizeMm: vec3,
  rotationDeg: vec3,
  orientation: z.enum(['any', 'keep_up', 'fixed']),
  volumeMm3: z.number(),
  areaMm2: z.number(),
  triangles: z.number(),
  watertight: z.boolean(),
  shells: z.number(),
  openEdges: z.number(),
  nonManifoldEdges: z.number(),
  oriented: z.boolean(),
  warnings: z.array(partWarningSchema),
  materialId: id.nullable(),
  materialName: z.string().nullable(),
  timesUsed: z.number(),
  uploadedBy: z.object({ id, name: z.string() }).nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
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
export type Part = z.infer<typeof partSchema>;

export const partListSchema = z.object({ items: z.array(partSchema), total: z.number() });
export type PartList = z.infer<typeof partListSchema>;

export const rejectedFileSchema = z.object({ file: z.string(), code: z.string(), message: z.string() });
export const partUploadSchema = z.object({ parts: z.array(partSchema), rejected: z.array(rejectedFileSchema) });
export type RejectedFile = z.infer<typeof rejectedFileSchema>;
export type PartUploadResult = z.infer<typeof partUploadSchema>;

/** The list query as the library screen holds it; empty values are left out of the URL. */
export type PartListParams = {
  search?: string;
  sort?: string;
  page?: number;
  pageSize?: number;
  materialId?: string;
  warnings?: string;
};

export const partKeys = {
  all: (labId: string) => ['labs', labId, 'parts'] as const,
  list: (labId: string, params: PartListParams) => ['labs', labId, 'parts', 'list', params] as const,
  one: (labId: string, partId: string) => ['labs', labId, 'parts', 'one', partId] as const,
};

export function partListPath(labId: string, params: PartListParams): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) {
    if (v !== undefined && v !== '' && v !== null) q.set(k, String(v));
  }
  const s = q.toString();
  return `/labs/${labId}/parts${s ? `?${s}` : ''}`;
}

/** Where the stored bytes of a part are served (for the 3D preview). */
export function partFileUrl(labId: string, partId: string): string {
  return `/api/labs/${labId}/parts/${partId}/file`;
}

export function usePartsQuery(labId: string | undefined, params: PartListParams, enabled = true) {
  return useQuery({
    queryKey: partKeys.list(labId ?? '', params),
    queryFn: ({ signal }) => api(partListPath(labId ?? '', params), { schema: partListSchema, signal }),
    enabled: !!labId && enabled,
    // Paging and typing in the search box keep the old rows on screen until the new ones arrive.
    placeholderData: keepPreviousData,
  });
}

export function usePartQuery(labId: string | undefined, partId: string | undefined) {
  return useQuery({
    queryKey: partKeys.one(labId ?? '', partId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/parts/${partId}`, { schema: partSchema, signal }),
    enabled: !!labId && !!partId,
  });
}

export function useUpdatePartMutation(labId: string, partId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: PartPatch) => api(`/labs/${labId}/parts/${partId}`, { method: 'PATCH', body: patch, schema: partSchema }),
    onSuccess: (part) => {
      qc.setQueryData(partKeys.one(labId, partId), part);
      qc.invalidateQueries({ queryKey: [...partKeys.all(labId), 'list'] });
    },
  });
}

export function useDeletePartMutation(labId: string, partId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api(`/labs/${labId}/parts/${partId}`, { method: 'DELETE' }),
    onSuccess: () => {
      qc.removeQueries({ queryKey: partKeys.one(labId, partId) });
      qc.invalidateQueries({ queryKey: [...partKeys.all(labId), 'list'] });
    },
  });
}

/** After an upload: the library's pages are stale. */
export function invalidatePartLists(qc: ReturnType<typeof useQueryClient>, labId: string) {
  return qc.invalidateQueries({ queryKey: [...partKeys.all(labId), 'list'] });
}
