import { useLocalSearchParams } from 'expo-router';
import { PartPage } from '@/components/parts/PartPage';

export default function PartRoute() {
  const { partId } = useLocalSearchParams<{ partId: string }>();
  return <PartPage partId={String(partId)} />;
}
