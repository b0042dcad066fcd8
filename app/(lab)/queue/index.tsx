import { useLab } from '@/components/lab/useCurrentLab';
import { EmptyState, Screen } from '@/components/ui';

export default function QueueRoute() {
  const lab = useLab();
  return (
    <Screen title="Queue" subtitle={`Each machine of ${lab.name} with its approved builds in order.`} testID="screen-queue">
      <EmptyState
        testID="queue-empty"
        title="Nothing queued"
        body="Approved plans line up here per machine, with predicted start, finish and cooled times, due dates, chamber swaps and the requests that will be late."
        who="Ordered by leads; followed by planners and operators."
      />
    </Screen>
  );
}
