import type { MachineProfile } from '../../shared/types/profiles';
import { machineViewSchema as machineSchema, type MachineView as Machine } from '../../shared/schemas/profiles';
import { labResource } from './labResource';

const machines = labResource<Machine, MachineProfile>('machines', machineSchema);

export const machineKeys = machines.keys;
export const useMachinesQuery = machines.useListQuery;
export const useMachineQuery = machines.useOneQuery;
export const useCreateMachineMutation = machines.useCreateMutation;
export const useUpdateMachineMutation = machines.useUpdateMutation;
export const useDeleteMachineMutation = machines.useDeleteMutation;
