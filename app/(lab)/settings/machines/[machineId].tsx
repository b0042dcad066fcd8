import { useLocalSearchParams } from 'expo-router';
import { EditMachine } from '@/components/settings/MachinesSection';

export default function EditMachineRoute() {
  const { machineId } = useLocalSearchParams<{ machineId: string }>();
  return <EditMachine machineId={String(machineId)} />;
}
