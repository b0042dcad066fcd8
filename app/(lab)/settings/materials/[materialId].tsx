import { useLocalSearchParams } from 'expo-router';
import { EditMaterial } from '@/components/settings/MaterialsSection';

export default function EditMaterialRoute() {
  const { materialId } = useLocalSearchParams<{ materialId: string }>();
  return <EditMaterial materialId={String(materialId)} />;
}
