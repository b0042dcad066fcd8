import { useLocalSearchParams } from 'expo-router';
import { LotScreen } from '@/components/powder/LotScreen';

export default function LotRoute() {
  const { lotId } = useLocalSearchParams<{ lotId: string }>();
  return <LotScreen lotId={String(lotId)} />;
}
