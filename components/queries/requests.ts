import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  requestLineViewSchema,
  requestListResponseSchema,
  requestViewSchema,
  type RequestLineView,
  type RequestPatch,
  type RequestView,
} from '../../shared/schemas/requests';
import { api } from '../api/client';

/** Response shapes of the request routes: the server's own views, parsed at the client's edge. */
export const requestLineSchema = requestLineViewSchema;
export const requestSchema = requestViewSchema;
export type LabRequest = RequestView;
export type LabRequestLine = RequestLineView;
export const requestListSchema = requestListResponseSchema;

export type RequestListParams = {
  status?: 'open' | 'cancelled' | 'done' | 'all';
  sort?: string;
  search?: string;
  page?: number;
  pageSize?: number;
};

/** What the create form sends (the server validates it again and names the field it refuses). */
export type RequestInput = {
  title: string;
  materialId: string;
  dueDate: string;
  priority: 'low' | 'normal' | 'high' | 'urgent';
  notes: string;
  lines: { partId: string; quantity: number }[];
};

export const requestKeys = {
  all: (labId: string) => ['labs', labId, 'requests'] as const,
  list: (labId: string, params: RequestListParams) => ['labs', labId, 'requests', 'list', params] as const,
  one: (labId: string, requestId: string) => ['labs', labId, 'requests', 'one', requestId] as const,
};

function listPath(labId: string, params: RequestListParams): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') q.set(k, String(v));
  const s = q.toString();
  return `/labs/${labId}/requests${s ? `?${s}` : ''}`;
}

export function useRequestsQuery(labId: string | undefined, params: RequestListParams) {
  return useQuery({
    queryKey: requestKeys.list(labId ?? '', params),
    queryFn: ({ signal }) => api(listPath(labId ?? '', params), { schema: requestListSchema, signal }),
    enabled: !!labId,
    placeholderData: keepPreviousData,
  });
}

export function useRequestQuery(labId: string | undefined, requestId: string | undefined) {
  return useQuery({
    queryKey: requestKeys.one(labId ?? '', requestId ?? ''),
    queryFn: ({ signal }) => api(`/labs/${labId}/requests/${requestId}`, { schema: requestSchema, signal }),
    enabled: !!labId && !!requestId,
  });
}

export function useCreateRequestMutation(labId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: RequestInput) => api(`/labs/${labId}/requests`, { method: 'POST', body: input, schema: requestSchema }),
    onSuccess: (request) => {
      qc.setQueryData(requestKeys.one(labId, request.id), request);
      qc.invalidateQueries({ queryKey: [...requestKeys.all(labId), 'list'] });
    },
  });
}

export function useUpdateRequestMutation(labId: string, requestId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: RequestPatch) => api(`/labs/${labId}/requests/${requestId}`, { method: 'PATCH', body: patch, schema: requestSchema }),
    onSuccess: (request) => {
      qc.setQueryData(requestKeys.one(labId, requestId), request);
      qc.invalidateQueries({ queryKey: [...requestKeys.all(labId), 'list'] });
    },
  });
}
