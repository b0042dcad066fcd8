import { useLab } from '@/components/lab/useCurrentLab';
import { ReviewList } from '@/components/review/ReviewList';
import { Notice, Screen } from '@/components/ui';

export default function ReviewListRoute() {
  const lab = useLab();
  return (
    <Screen title="Plans to review" subtitle="Approve a plan into its machine's queue, or send it back with a comment." testID="screen-review-list">
      {!lab.isLead ? <Notice tone="info">Only leads decide on plans; you can look at what is waiting.</Notice> : null}
      <ReviewList />
    </Screen>
  );
}
