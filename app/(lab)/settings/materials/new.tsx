import { NewProfile } from '@/components/settings/ProfileSection';
import { materialProfiles } from '@/components/settings/profileKinds';

export default function NewMaterialRoute() {
  return <NewProfile kind={materialProfiles} />;
}
