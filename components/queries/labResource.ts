import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../api/client';

/**
 * The five routes a lab-owned profile resource has (list, create, read,
 * patch, delete) as react-query hooks. Machines and materials share them.
 */
export function labResource<Item extends { id: string }, Input>(segment: string, schema: z.ZodType<Item>) {
  const keys = {
    all: (labId: string) => ['labs', labId, segment] as const,
    one: (labId: string, id: string) => ['labs', labId, segment, id] as const,
  };

  function useListQuery(labId: string | undefined) {
    return useQuery<Item[]>({
      queryKey: keys.all(labId ?? ''),
      queryFn: () => api(`/labs/${labId}/${segment}`, { schema: z.array(schema) }) as Promise<Item[]>,
      enabled: !!labId,
    });
  }

  function useOneQuery(labId: string | undefined, id: string | undefined) {
    const qc = useQueryClient();
    return useQuery<Item>({
      queryKey: keys.one(labId ?? '', id ?? ''),
      queryFn: () => api(`/labs/${labId}/${segment}/${id}`, { schema }) as Promise<Item>,
      enabled: !!labId && !!id,
      // Opening a row of a loaded list shows it at once.
      initialData: () => qc.getQueryData<Item[]>(keys.all(labId ?? ''))?.find((m) => m.id === id),
    });
  }

  function useCreateMutation(labId: string) {
    const qc = useQueryClient();
    return useMutation({
      mutationFn: (input: Input) => api(`/labs/${labId}/${segment}`, { method: 'POST', body: input, schema }) as Promise<Item>,
      onSuccess: () => qc.invalidateQueries({ queryKey: keys.all(labId) }),
    });
  }

  function useUpdateMutation(labId: string, id: string) {
    const qc = useQueryClient();
    return useMutation({
      mutationFn: (input: Partial<Input>) =>
        api(`/labs/${labId}/${segment}/${id}`, { method: 'PATCH', body: input, schema }) as Promise<Item>,
      onSuccess: (item) => {
        qc.setQueryData(keys.one(labId, id), item);
        qc.invalidateQueries({ queryKey: keys.all(labId), exact: true });
      },
    });
  }

  function useDeleteMutation(labId: string, id: string) {
    const qc = useQueryClient();
    return useMutation({
      mutationFn: () => api(`/labs/${labId}/${segment}/${id}`, { method: 'DELETE' }),
      onSuccess: () => {
        qc.removeQueries({ queryKey: keys.one(labId, id) });
        qc.invalidateQueries({ queryKey: keys.all(labId), exact: true });
      },
    });
  }

  return { keys, useListQuery, useOneQuery, useCreateMutation, useUpdateMutation, useDeleteMutation };
}
