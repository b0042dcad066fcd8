import { useLocalSearchParams } from 'expo-router';
import { MaterialPowderScreen } from '@/components/powder/MaterialPowderScreen';

export default function MaterialPowderRoute() {
  const { materialId } = useLocalSearchParams<{ materialId: string }>();
  return <MaterialPowderScreen materialId={String(materialId)} />;
}
