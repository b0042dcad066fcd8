import { StyleSheet, View } from 'react-native';
import type { PlanEventView } from '../../shared/schemas/plans';
import { colors, spacing } from '../theme';
import { Text } from '../ui';
import { formatDateTime } from '../ui/format';
import { STATUS_LABELS } from './format';

/** Every status change of the plan, oldest first: who, when, and the comment given. */
export function PlanHistory({ events }: { events: PlanEventView[] }) {
  return (
    <View style={styles.list} testID="plan-history">
      {events.map((e) => (
        <View key={e.id} style={styles.item}>
          <View style={styles.dot} />
          <View style={{ flex: 1 }}>
            <Text variant="label">
              {e.from ? `${STATUS_LABELS[e.from]} → ${STATUS_LABELS[e.to]}` : `Made as ${STATUS_LABELS[e.to].toLowerCase()}`}
            </Text>
            <Text variant="caption" color="inkMuted">
              {e.by?.name ?? 'Someone'} · {formatDateTime(e.at)}
            </Text>
            {e.comment ? <Text variant="caption">“{e.comment}”</Text> : null}
          </View>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.sm },
  item: { flexDirection: 'row', gap: spacing.sm },
  dot: { width: 8, height: 8, borderRadius: 4, backgroundColor: colors.teal, marginTop: 5 },
});
