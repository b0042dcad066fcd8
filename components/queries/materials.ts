import type { MaterialProfile } from '../../shared/types/profiles';
import { materialViewSchema as materialSchema, type MaterialView as Material } from '../../shared/schemas/profiles';
import { labResource } from './labResource';

const materials = labResource<Material, MaterialProfile>('materials', materialSchema);

export const materialKeys = materials.keys;
export const useMaterialsQuery = materials.useListQuery;
export const useMaterialQuery = materials.useOneQuery;
export const useCreateMaterialMutation = materials.useCreateMutation;
export const useUpdateMaterialMutation = materials.useUpdateMutation;
export const useDeleteMaterialMutation = materials.useDeleteMutation;
