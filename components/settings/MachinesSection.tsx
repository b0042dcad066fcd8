import { router } from 'expo-router';
import { machineProfileSchema, type MachineProfile } from '../../shared/types/profiles';
import type { Machine } from '../api/schemas';
import { useLab } from '../lab/useCurrentLab';
import {
  useCreateMachineMutation,
  useDeleteMachineMutation,
  useMachineQuery,
  useMachinesQuery,
  useUpdateMachineMutation,
} from '../queries/machines';
import { Button, EmptyState, ErrorState, Figure, LoadingState, Table, Text, type Column } from '../ui';
import { formatNumber } from '../ui/format';
import { profileFields } from './pickProfile';
import { machineFieldGroups } from './profileFields';
import { emptyValues, valuesFrom } from './profileForm';
import { DeleteProfile, ProfileBack } from './ProfileParts';
import { ProfileForm } from './ProfileForm';
import { SettingsScreen } from './SettingsScreen';

const n = formatNumber;

export function MachinesSection() {
  const lab = useLab();
  const machines = useMachinesQuery(lab.id);
  const columns: Column<Machine>[] = [
    { key: 'name', title: 'Name', flex: 2, render: (m) => <Text variant="bodyStrong">{m.name}</Text> },
    { key: 'chamber', title: 'Build volume mm', flex: 2, mono: true, value: (m) => m.chamberMm.map((v) => n(v, 1)).join(' × ') },
    { key: 'layers', title: 'Layers mm', flex: 1.4, mono: true, value: (m) => m.layerHeightsMm.map((v) => n(v, 3)).join(', ') },
    { key: 'laser', title: 'Laser W', width: 90, align: 'right', mono: true, value: (m) => n(m.laserPowerW, 1) },
    { key: 'preheat', title: 'Preheat min', width: 110, align: 'right', mono: true, value: (m) => n(m.preheatSeconds / 60, 1) },
    { key: 'chambers', title: 'Chambers', width: 100, align: 'right', mono: true, value: (m) => String(m.chamberCount) },
    { key: 'rate', title: 'Rate / h', width: 100, align: 'right', mono: true, value: (m) => n(m.hourlyRate, 2) },
  ];
  return (
    <SettingsScreen
      title="Machines"
      subtitle="The lab's powder-bed printers and the figures that drive packing and estimates."
      testID="settings-machines"
      actions={lab.isLead ? <Button label="Add machine" testID="machine-add" onPress={() => router.push('/settings/machines/new')} /> : null}
    >
      {machines.isPending ? (
        <LoadingState label="Loading machines…" />
      ) : machines.isError ? (
        <ErrorState error={machines.error} onRetry={() => machines.refetch()} />
      ) : (
        <Table
          testID="machines-table"
          columns={columns}
          rows={machines.data}
          rowKey={(m) => m.id}
          rowTestID={(m) => `machine-row-${m.id}`}
          onRowPress={(m) => router.push(`/settings/machines/${m.id}`)}
          empty={
            <EmptyState
              title="No machines yet"
              body="Add each printer with its usable build volume, layer heights, laser power, timing, cooling and rates. Planners pick from these when they pack a build."
              who={lab.isLead ? 'You add them as a lead.' : 'Added by the lab’s leads.'}
            />
          }
        />
      )}
    </SettingsScreen>
  );
}

export function NewMachine() {
  const lab = useLab();
  const create = useCreateMachineMutation(lab.id);
  return (
    <SettingsScreen title="Add machine" testID="settings-machine-new">
      <ProfileBack href="/settings/machines" label="All machines" />
      {lab.isLead ? (
        <ProfileForm<MachineProfile>
          groups={machineFieldGroups}
          schema={machineProfileSchema}
          initial={emptyValues(machineFieldGroups)}
          submitLabel="Add machine"
          testIDPrefix="machine"
          submitting={create.isPending}
          serverError={create.error}
          onSubmit={(profile) => create.mutate(profile, { onSuccess: () => router.replace('/settings/machines') })}
        />
      ) : (
        <Figure color="inkMuted">Only leads add machines.</Figure>
      )}
    </SettingsScreen>
  );
}

export function EditMachine({ machineId }: { machineId: string }) {
  const lab = useLab();
  const machine = useMachineQuery(lab.id, machineId);
  const update = useUpdateMachineMutation(lab.id, machineId);
  const remove = useDeleteMachineMutation(lab.id, machineId);
  const title = machine.data?.name ?? 'Machine';
  return (
    <SettingsScreen title={title} subtitle={lab.isLead ? 'Packing and estimates read these figures.' : 'Read only: leads edit machines.'} testID="settings-machine-edit">
      <ProfileBack href="/settings/machines" label="All machines" />
      {machine.isPending ? (
        <LoadingState />
      ) : machine.isError ? (
        <ErrorState error={machine.error} onRetry={() => machine.refetch()} />
      ) : (
        <ProfileForm<MachineProfile>
          key={machine.data.updatedAt}
          groups={machineFieldGroups}
          schema={machineProfileSchema}
          initial={valuesFrom(machineFieldGroups, machine.data)}
          readOnly={!lab.isLead}
          submitLabel="Save changes"
          testIDPrefix="machine"
          submitting={update.isPending}
          serverError={update.error}
          onSubmit={(profile) => update.mutate(profileFields(profile))}
          footer={
            lab.isLead ? (
              <DeleteProfile
                what={`machine “${machine.data.name}”`}
                testID="machine-delete"
                pending={remove.isPending}
                error={remove.error}
                saved={update.isSuccess && !update.isPending}
                onDelete={() => remove.mutate(undefined, { onSuccess: () => router.replace('/settings/machines') })}
              />
            ) : null
          }
        />
      )}
    </SettingsScreen>
  );
}
