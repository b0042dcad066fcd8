import { NewPlan } from '@/components/plans/NewPlan';

export default function NewPlanRoute() {
  return <NewPlan />;
}
