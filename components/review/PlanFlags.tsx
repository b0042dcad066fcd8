import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePlanFlagsQuery } from '../queries/review';
import { colors, radius, spacing } from '../theme';
import { Badge, Card, ErrorState, LoadingState, Text } from '../ui';
import type { PlanFlag } from '../../shared/schemas/review';

/**
 * What to look at before approving: each flag the server found, its title and
 * the sentence saying what and why. `compact` is the plan editor's strip: only
 * shown when there is something to say.
 */
export function PlanFlags({ planId, compact = false, testID = 'plan-flags' }: { planId: string; compact?: boolean; testID?: string }) {
  const lab = useLab();
  const flags = usePlanFlagsQuery(lab.id, planId);
  if (compact) {
    if (!flags.data || flags.data.flags.length === 0) return null;
    return (
      <View style={styles.strip} testID={testID}>
        {flags.data.flags.map((f, i) => (
          <FlagRow key={`${f.kind}:${i}`} flag={f} />
        ))}
      </View>
    );
  }
  const count = flags.data?.flags.length ?? 0;
  return (
    <Card
      title="Before you approve"
      subtitle={flags.data ? (count === 0 ? 'Nothing to flag: density, material, due dates and meshes are in order.' : `${count} point${count === 1 ? '' : 's'} to check`) : undefined}
      actions={flags.data && count > 0 ? <Badge label={`${count} flag${count === 1 ? '' : 's'}`} tone="amber" testID={`${testID}-count`} /> : null}
      testID={testID}
    >
      {flags.isPending ? (
        <LoadingState label="Checking the plan…" />
      ) : flags.isError ? (
        <ErrorState error={flags.error} onRetry={() => flags.refetch()} />
      ) : (
        flags.data.flags.map((f, i) => <FlagRow key={`${f.kind}:${i}`} flag={f} />)
      )}
    </Card>
  );
}

function FlagRow({ flag }: { flag: PlanFlag }) {
  return (
    <View style={styles.flag} testID={`flag-${flag.kind}`}>
      <Text variant="bodyStrong">{flag.title}</Text>
      <Text variant="body">{flag.message}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  strip: { gap: spacing.sm },
  flag: {
    borderLeftWidth: 4,
    borderLeftColor: colors.amber,
    backgroundColor: colors.amberSoft,
    borderRadius: radius.md,
    padding: spacing.md,
    gap: spacing.xxs,
  },
});
