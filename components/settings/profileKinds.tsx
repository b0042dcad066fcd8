import {
  checkedMachineProfileSchema,
  checkedMaterialProfileSchema,
  machineFieldDefaults,
  materialFieldDefaults,
  type MachineProfile,
  type MaterialProfile,
} from '../../shared/types/profiles';
import type { MachineView as Machine, MaterialView as Material } from '../../shared/schemas/profiles';
import {
  useCreateMachineMutation,
  useDeleteMachineMutation,
  useMachineQuery,
  useMachinesQuery,
  useUpdateMachineMutation,
} from '../queries/machines';
import {
  useCreateMaterialMutation,
  useDeleteMaterialMutation,
  useMaterialQuery,
  useMaterialsQuery,
  useUpdateMaterialMutation,
} from '../queries/materials';
import { formatNumber as n } from '../ui/format';
import { machineFieldGroups, materialFieldGroups } from './profileFields';
import { nameColumn, type ProfileKind } from './ProfileSection';

export const machineProfiles: ProfileKind<Machine, MachineProfile> = {
  kind: 'machine',
  subtitle: "The lab's powder-bed printers and the figures that drive packing and estimates.",
  emptyBody:
    'Add each printer with its usable build volume, layer heights, laser power, timing, cooling and rates. Planners pick from these when they pack a build.',
  columns: [
    nameColumn(),
    { key: 'chamber', title: 'Build volume mm', flex: 2, mono: true, value: (m) => m.chamberMm.map((v) => n(v, 1)).join(' × ') },
    { key: 'layers', title: 'Layers mm', flex: 1.4, mono: true, value: (m) => m.layerHeightsMm.map((v) => n(v, 3)).join(', ') },
    { key: 'laser', title: 'Laser W', width: 90, align: 'right', mono: true, value: (m) => n(m.laserPowerW, 1) },
    { key: 'preheat', title: 'Preheat min', width: 110, align: 'right', mono: true, value: (m) => n(m.preheatSeconds / 60, 1) },
    { key: 'chambers', title: 'Chambers', width: 100, align: 'right', mono: true, value: (m) => String(m.chamberCount) },
    { key: 'rate', title: 'Rate ¤/h', width: 100, align: 'right', mono: true, value: (m) => n(m.hourlyRate, 2) },
  ],
  groups: machineFieldGroups,
  schema: checkedMachineProfileSchema,
  defaults: machineFieldDefaults,
  queries: {
    useListQuery: useMachinesQuery,
    useOneQuery: useMachineQuery,
    useCreateMutation: useCreateMachineMutation,
    useUpdateMutation: useUpdateMachineMutation,
    useDeleteMutation: useDeleteMachineMutation,
  },
};

export const materialProfiles: ProfileKind<Material, MaterialProfile> = {
  kind: 'material',
  subtitle: 'The powders the lab prints with: densities, refresh ratio, spacing and margins, sintering figures and price.',
  emptyBody:
    'Add each powder with its solid and bulk density, refresh ratio, layer height, spacing and margins, energy density, thermal figures, losses and price. Planners pick one per build.',
  columns: [
    nameColumn(),
    { key: 'solid', title: 'Solid g/cm³', width: 110, align: 'right', mono: true, value: (m) => n(m.solidDensityGPerCm3, 3) },
    { key: 'bulk', title: 'Bulk g/cm³', width: 110, align: 'right', mono: true, value: (m) => n(m.bulkDensityGPerCm3, 3) },
    { key: 'refresh', title: 'Refresh', width: 90, align: 'right', mono: true, value: (m) => `${n(m.refreshRatio * 100, 1)} %` },
    { key: 'layer', title: 'Layer mm', width: 100, align: 'right', mono: true, value: (m) => n(m.defaultLayerHeightMm, 3) },
    { key: 'spacing', title: 'Gap mm', width: 90, align: 'right', mono: true, value: (m) => n(m.spacingMm, 2) },
    { key: 'bed', title: 'Bed °C', width: 90, align: 'right', mono: true, value: (m) => n(m.bedTempC, 1) },
    { key: 'price', title: 'Price ¤/kg', width: 110, align: 'right', mono: true, value: (m) => n(m.pricePerKg, 2) },
  ],
  groups: materialFieldGroups,
  schema: checkedMaterialProfileSchema,
  defaults: materialFieldDefaults,
  queries: {
    useListQuery: useMaterialsQuery,
    useOneQuery: useMaterialQuery,
    useCreateMutation: useCreateMaterialMutation,
    useUpdateMutation: useUpdateMaterialMutation,
    useDeleteMutation: useDeleteMaterialMutation,
  },
};
