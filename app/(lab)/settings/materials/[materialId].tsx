import { useLocalSearchParams } from 'expo-router';
import { EditProfile } from '@/components/settings/ProfileSection';
import { materialProfiles } from '@/components/settings/profileKinds';

export default function EditMaterialRoute() {
  const { materialId } = useLocalSearchParams<{ materialId: string }>();
  return <EditProfile kind={materialProfiles} id={String(materialId)} />;
}
