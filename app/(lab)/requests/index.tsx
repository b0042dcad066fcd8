import { useLab } from '@/components/lab/useCurrentLab';
import { EmptyState, Screen } from '@/components/ui';

export default function RequestsRoute() {
  const lab = useLab();
  return (
    <Screen title="Requests" subtitle={`What ${lab.name} has been asked to print, and how far each line has got.`} testID="screen-requests">
      <EmptyState
        testID="requests-empty"
        title="No requests yet"
        body="A request lists parts with their quantities, a material, a due date and a priority. Each line will show how many are planned into builds and how many were printed good."
        who="Filed by designers; planners turn open requests into builds."
      />
    </Screen>
  );
}
