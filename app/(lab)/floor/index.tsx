import { useLab } from '@/components/lab/useCurrentLab';
import { EmptyState, Screen } from '@/components/ui';

export default function FloorRoute() {
  const lab = useLab();
  return (
    <Screen title="Floor" subtitle={`The current run at each machine of ${lab.name}.`} testID="screen-floor">
      <EmptyState
        testID="floor-empty"
        title="No run to work on"
        body="When a machine's next approved build is due, its run appears here as one card: the pre-print checklist, the start and next-stage buttons, the printing and cooling timers, the cautions of each stage and the part count at breakout."
        who="Worked by operators at the machine."
      />
    </Screen>
  );
}
