import { useLocalSearchParams } from 'expo-router';
import { useCallback, useState } from 'react';
import { PlanEditor } from '@/components/plans/PlanEditor';

export default function PlanRoute() {
  const { planId } = useLocalSearchParams<{ planId: string }>();
  // A packing worker that was lost is replaced by mounting the editor afresh; the plan and the draft are kept.
  const [generation, setGeneration] = useState(0);
  const [lost, setLost] = useState<string | null>(null);
  const onWorkerLost = useCallback((message: string) => {
    setLost(message);
    setGeneration((g) => g + 1);
  }, []);
  return <PlanEditor key={`${planId}:${generation}`} planId={String(planId)} lostWorker={lost} onWorkerLost={onWorkerLost} />;
}
