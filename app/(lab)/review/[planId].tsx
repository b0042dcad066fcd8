import { useLocalSearchParams } from 'expo-router';
import { ReviewScreen } from '@/components/review/ReviewScreen';

export default function ReviewRoute() {
  const { planId } = useLocalSearchParams<{ planId: string }>();
  return <ReviewScreen key={String(planId)} planId={String(planId)} />;
}
