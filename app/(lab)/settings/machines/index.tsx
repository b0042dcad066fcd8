import { ProfileList } from '@/components/settings/ProfileSection';
import { machineProfiles } from '@/components/settings/profileKinds';

export default function MachinesRoute() {
  return <ProfileList kind={machineProfiles} />;
}
