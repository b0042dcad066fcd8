import { PlanList } from '@/components/plans/PlanList';

export default function PlansRoute() {
  return <PlanList />;
}
