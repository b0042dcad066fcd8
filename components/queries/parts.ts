import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  partListResponseSchema,
  partRevisionsViewSchema,
  partUploadResponseSchema,
  partViewSchema,
  partWarningSchema,
  rejectedFileSchema,
  type PartListResponse,
  type PartPatch,
  type PartUploadResponse,
  type PartView,
  type RejectedFile,
} from '../../shared/schemas/parts';
import { api, ApiError, baseUrl } from '../api/client';
import type { PickedFile } from '../upload/types';

/** Response shapes of the part routes: the server's own views, parsed at the client's edge. */
export { partWarningSchema, rejectedFileSchema };
export const partSchema = partViewSchema;
export type Part = PartView;
export const partListSchema = partListResponseSchema;
export type PartList = PartListResponse;
export const partUploadSchema = partUploadResponseSchema;
export type { RejectedFile };
export type PartUploadResult = PartUploadResponse;

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
  revisions: (labId: string, partId: string) => ['labs', labId, 'parts', 'one', partId, 'revisions'] as const,
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

/** One part's record, as a query (for useQuery, or useQueries over several parts). */
export function partQueryOptions(labId: string | undefined, partId: string | undefined) {
  return {
    queryKey: partKeys.one(labId ?? '', partId ?? ''),
    queryFn: ({ signal }: { signal: AbortSignal }) => api(`/labs/${labId}/parts/${partId}`, { schema: partSchema, signal }),
    enabled: !!labId && !!partId,
  };
}

export function usePartQuery(labId: string | undefined, partId: string | undefined) {
  return useQuery(partQueryOptions(labId, partId));
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

/** A part's file revisions, newest first, each with the plans that use it. */
export function usePartRevisionsQuery(labId: string, partId: string) {
  return useQuery({
    queryKey: partKeys.revisions(labId, partId),
    queryFn: ({ signal }) => api(`/labs/${labId}/parts/${partId}/revisions`, { schema: partRevisionsViewSchema, signal }),
  });
}

/** Sends a new file for the part; the answer is the new revision (a part of its own). */
export function useAddRevisionMutation(labId: string, partId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (file: PickedFile) => {
      const form = new FormData();
      form.append('unit', 'mm');
      if (typeof Blob !== 'undefined' && file.body instanceof Blob) form.append('file', file.body, file.name);
      else form.append('file', file.body as unknown as Blob);
      const res = await fetch(`${baseUrl}/api/labs/${labId}/parts/${partId}/revisions`, {
        method: 'POST',
        credentials: 'same-origin',
        headers: { Accept: 'application/json' },
        body: form,
      });
      const json: unknown = await res.json().catch(() => null);
      if (!res.ok) {
        const err = (json as { error?: { code?: string; message?: string; field?: string } } | null)?.error;
        throw new ApiError(res.status, err?.code ?? 'http_error', err?.message ?? `The file was not taken (${res.status}).`, err?.field);
      }
      return partViewSchema.parse(json);
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: partKeys.all(labId) }),
  });
}
