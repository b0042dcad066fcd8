import { NewProfile } from '@/components/settings/ProfileSection';
import { machineProfiles } from '@/components/settings/profileKinds';

export default function NewMachineRoute() {
  return <NewProfile kind={machineProfiles} />;
}
