import { ProfileList } from '@/components/settings/ProfileSection';
import { materialProfiles } from '@/components/settings/profileKinds';

export default function MaterialsRoute() {
  return <ProfileList kind={materialProfiles} />;
}
