import { useLocalSearchParams } from 'expo-router';
import { EditProfile } from '@/components/settings/ProfileSection';
import { machineProfiles } from '@/components/settings/profileKinds';

export default function EditMachineRoute() {
  const { machineId } = useLocalSearchParams<{ machineId: string }>();
  return <EditProfile kind={machineProfiles} id={String(machineId)} />;
}
