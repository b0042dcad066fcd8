import type { MachineProfile } from '../../shared/types/profiles';
import { machineSchema, type Machine } from '../api/schemas';
import { labResource } from './labResource';

const machines = labResource<Machine, MachineProfile>('machines', machineSchema);

export const machineKeys = machines.keys;
export const useMachinesQuery = machines.useListQuery;
export const useMachineQuery = machines.useOneQuery;
export const useCreateMachineMutation = machines.useCreateMutation;
export const useUpdateMachineMutation = machines.useUpdateMutation;
export const useDeleteMachineMutation = machines.useDeleteMutation;
