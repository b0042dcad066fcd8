import { router } from 'expo-router';
import { materialProfileSchema, type MaterialProfile } from '../../shared/types/profiles';
import type { Material } from '../api/schemas';
import { useLab } from '../lab/useCurrentLab';
import {
  useCreateMaterialMutation,
  useDeleteMaterialMutation,
  useMaterialQuery,
  useMaterialsQuery,
  useUpdateMaterialMutation,
} from '../queries/materials';
import { Button, EmptyState, ErrorState, Figure, LoadingState, Table, Text, type Column } from '../ui';
import { formatNumber } from '../ui/format';
import { profileFields } from './pickProfile';
import { materialFieldGroups } from './profileFields';
import { emptyValues, valuesFrom } from './profileForm';
import { DeleteProfile, ProfileBack } from './ProfileParts';
import { ProfileForm } from './ProfileForm';
import { SettingsScreen } from './SettingsScreen';

const n = formatNumber;

export function MaterialsSection() {
  const lab = useLab();
  const materials = useMaterialsQuery(lab.id);
  const columns: Column<Material>[] = [
    { key: 'name', title: 'Name', flex: 2, render: (m) => <Text variant="bodyStrong">{m.name}</Text> },
    { key: 'solid', title: 'Solid g/cm³', width: 110, align: 'right', mono: true, value: (m) => n(m.solidDensityGPerCm3, 3) },
    { key: 'bulk', title: 'Bulk g/cm³', width: 110, align: 'right', mono: true, value: (m) => n(m.bulkDensityGPerCm3, 3) },
    { key: 'refresh', title: 'Refresh', width: 90, align: 'right', mono: true, value: (m) => `${n(m.refreshRatio * 100, 1)} %` },
    { key: 'layer', title: 'Layer mm', width: 100, align: 'right', mono: true, value: (m) => n(m.defaultLayerHeightMm, 3) },
    { key: 'spacing', title: 'Gap mm', width: 90, align: 'right', mono: true, value: (m) => n(m.spacingMm, 2) },
    { key: 'bed', title: 'Bed °C', width: 90, align: 'right', mono: true, value: (m) => n(m.bedTempC, 1) },
    { key: 'price', title: 'Price / kg', width: 110, align: 'right', mono: true, value: (m) => n(m.pricePerKg, 2) },
  ];
  return (
    <SettingsScreen
      title="Materials"
      subtitle="The powders the lab prints with: densities, refresh ratio, spacing and margins, sintering figures and price."
      testID="settings-materials"
      actions={lab.isLead ? <Button label="Add material" testID="material-add" onPress={() => router.push('/settings/materials/new')} /> : null}
    >
      {materials.isPending ? (
        <LoadingState label="Loading materials…" />
      ) : materials.isError ? (
        <ErrorState error={materials.error} onRetry={() => materials.refetch()} />
      ) : (
        <Table
          testID="materials-table"
          columns={columns}
          rows={materials.data}
          rowKey={(m) => m.id}
          rowTestID={(m) => `material-row-${m.id}`}
          onRowPress={(m) => router.push(`/settings/materials/${m.id}`)}
          empty={
            <EmptyState
              title="No materials yet"
              body="Add each powder with its solid and bulk density, refresh ratio, layer height, spacing and margins, energy density and price. Planners pick one per build."
              who={lab.isLead ? 'You add them as a lead.' : 'Added by the lab’s leads.'}
            />
          }
        />
      )}
    </SettingsScreen>
  );
}

export function NewMaterial() {
  const lab = useLab();
  const create = useCreateMaterialMutation(lab.id);
  return (
    <SettingsScreen title="Add material" testID="settings-material-new">
      <ProfileBack href="/settings/materials" label="All materials" />
      {lab.isLead ? (
        <ProfileForm<MaterialProfile>
          groups={materialFieldGroups}
          schema={materialProfileSchema}
          initial={emptyValues(materialFieldGroups)}
          submitLabel="Add material"
          testIDPrefix="material"
          submitting={create.isPending}
          serverError={create.error}
          onSubmit={(profile) => create.mutate(profile, { onSuccess: () => router.replace('/settings/materials') })}
        />
      ) : (
        <Figure color="inkMuted">Only leads add materials.</Figure>
      )}
    </SettingsScreen>
  );
}

export function EditMaterial({ materialId }: { materialId: string }) {
  const lab = useLab();
  const material = useMaterialQuery(lab.id, materialId);
  const update = useUpdateMaterialMutation(lab.id, materialId);
  const remove = useDeleteMaterialMutation(lab.id, materialId);
  const title = material.data?.name ?? 'Material';
  return (
    <SettingsScreen title={title} subtitle={lab.isLead ? 'Packing and estimates read these figures.' : 'Read only: leads edit materials.'} testID="settings-material-edit">
      <ProfileBack href="/settings/materials" label="All materials" />
      {material.isPending ? (
        <LoadingState />
      ) : material.isError ? (
        <ErrorState error={material.error} onRetry={() => material.refetch()} />
      ) : (
        <ProfileForm<MaterialProfile>
          key={material.data.updatedAt}
          groups={materialFieldGroups}
          schema={materialProfileSchema}
          initial={valuesFrom(materialFieldGroups, material.data)}
          readOnly={!lab.isLead}
          submitLabel="Save changes"
          testIDPrefix="material"
          submitting={update.isPending}
          serverError={update.error}
          onSubmit={(profile) => update.mutate(profileFields(profile))}
          footer={
            lab.isLead ? (
              <DeleteProfile
                what={`material “${material.data.name}”`}
                testID="material-delete"
                pending={remove.isPending}
                error={remove.error}
                saved={update.isSuccess && !update.isPending}
                onDelete={() => remove.mutate(undefined, { onSuccess: () => router.replace('/settings/materials') })}
              />
            ) : null
          }
        />
      )}
    </SettingsScreen>
  );
}
