import { useLocalSearchParams } from 'expo-router';
import { PlanEditor } from '@/components/plans/PlanEditor';

export default function PlanRoute() {
  const { planId } = useLocalSearchParams<{ planId: string }>();
  return <PlanEditor key={planId} planId={String(planId)} />;
}
