import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePlansQuery } from '../queries/plans';
import { colors, radius, spacing } from '../theme';
import { Badge, EmptyState, ErrorState, Icon, LinkPressable, LoadingState, Text } from '../ui';
import { formatDate, formatDateTime } from '../ui/format';
import type { PlanListItem } from '../../shared/schemas/plans';

const IN_REVIEW = ['in_review'] as const;

/** Plans a planner sent for review, oldest wait first: each opens the review of its chosen layout. */
export function ReviewList({ compact }: { compact?: boolean }) {
  const lab = useLab();
  const plans = usePlansQuery(lab.id, IN_REVIEW);
  if (plans.isPending) return <LoadingState label="Loading plans in review…" />;
  if (plans.isError) return <ErrorState error={plans.error} onRetry={() => plans.refetch()} />;
  const list = [...(plans.data as PlanListItem[])].sort((a, b) => a.updatedAt.localeCompare(b.updatedAt));
  if (list.length === 0) {
    return (
      <EmptyState
        testID="review-empty"
        title="No plans waiting for review"
        body="Plans a planner sends for review show here with their chosen layout, to approve into a machine's queue or send back with a comment."
        who="Planners send them; leads review them."
      />
    );
  }
  return (
    <View style={styles.list} testID="review-list">
      {list.map((p) => (
        <LinkPressable
          key={p.id}
          href={`/review/${p.id}`}
          testID={`review-item-${p.id}`}
          accessibilityLabel={`Review ${p.name}`}
          style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [styles.item, (pressed || hovered) && styles.itemHover]}
        >
          <View style={{ flex: 1, gap: spacing.xxs }}>
            <Text variant="bodyStrong">{p.name}</Text>
            <Text variant="caption" color="inkMuted">
              {p.machine.name} · {p.material.name} · {p.partCount} part{p.partCount === 1 ? '' : 's'} in {p.lineCount} line{p.lineCount === 1 ? '' : 's'}
            </Text>
            {!compact ? (
              <Text variant="caption" color="inkFaint">
                Sent {formatDateTime(p.updatedAt)}
                {p.createdBy ? ` · planned by ${p.createdBy.name}` : ''}
              </Text>
            ) : null}
          </View>
          {p.earliestDueDate ? <Badge label={`Due ${formatDate(p.earliestDueDate)}`} tone="amber" /> : null}
          <Icon name="chevron" size={18} color={colors.inkFaint} />
        </LinkPressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.sm },
  item: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    minHeight: 56,
    padding: spacing.md,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.lg,
  },
  itemHover: { borderColor: colors.ember },
});
