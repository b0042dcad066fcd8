import { useLab } from '@/components/lab/useCurrentLab';
import { EmptyState, Screen } from '@/components/ui';

export default function PlansRoute() {
  const lab = useLab();
  return (
    <Screen title="Plans" subtitle={`Builds of ${lab.name} by status, from draft to done.`} testID="screen-plans">
      <EmptyState
        testID="plans-empty"
        title="No plans yet"
        body="A plan is one machine, one material and a set of request lines, packed into one or more layouts with their layers, print hours, cooling, powder and cost per part. Drafts go to review, approved plans go to a machine's queue."
        who="Made by planners; reviewed and approved by leads."
      />
    </Screen>
  );
}
