import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePlanFlagsQuery } from '../queries/review';
import { spacing } from '../theme';
import { Badge, Card, ErrorState, LoadingState, Notice } from '../ui';
import type { PlanFlag } from '../../shared/schemas/review';
import type { PlanStatus } from '../../shared/plans/status';

/**
 * The card's heading for where the plan is: the flags are read before sending,
 * before approving, before printing, and afterwards as the build's record. The
 * server checks the machine's material and the due dates only before printing.
 */
export function flagsHeading(status: PlanStatus | undefined): { title: string; checked: string } {
  const all = 'density, material, due dates and meshes';
  switch (status) {
    case undefined:
    case 'in_review':
      return { title: 'Before you approve', checked: all };
    case 'draft':
    case 'changes_requested':
      return { title: 'Before it goes to review', checked: all };
    case 'approved':
    case 'queued':
      return { title: 'Before it prints', checked: all };
    case 'cancelled':
      return { title: 'Points on this plan', checked: 'density and meshes' };
    default:
      return { title: 'Points on this build', checked: 'density and meshes' };
  }
}

/**
 * What to look at before approving (or before sending, or printing, by the
 * plan's `status`): each flag the server found, its title and the sentence
 * saying what and why. `compact` is the plan editor's strip: only shown when
 * there is something to say; `folded` (on a phone) shows each flag's title,
 * its reason a tap away, so the layout is not pushed below the fold.
 */
export function PlanFlags({
  planId,
  status,
  compact = false,
  folded = false,
  testID = 'plan-flags',
}: {
  planId: string;
  status?: PlanStatus;
  compact?: boolean;
  folded?: boolean;
  testID?: string;
}) {
  const lab = useLab();
  const flags = usePlanFlagsQuery(lab.id, planId);
  if (compact) {
    if (!flags.data || flags.data.flags.length === 0) return null;
    return (
      <View style={styles.strip} testID={testID}>
        {flags.data.flags.map((f, i) => (
          <FlagRow key={`${f.kind}:${i}`} flag={f} folded={folded} />
        ))}
      </View>
    );
  }
  const count = flags.data?.flags.length ?? 0;
  const heading = flagsHeading(status);
  return (
    <Card
      title={heading.title}
      subtitle={flags.data ? (count === 0 ? `Nothing to flag: ${heading.checked} are in order.` : `${count} point${count === 1 ? '' : 's'} to check`) : undefined}
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

/** One flag: its title, and the sentence saying what and why (a tap away when `folded`). */
function FlagRow({ flag, folded = false }: { flag: PlanFlag; folded?: boolean }) {
  return (
    <Notice tone="caution" title={flag.title} folded={folded} testID={`flag-${flag.kind}`}>
      {flag.message}
    </Notice>
  );
}

const styles = StyleSheet.create({
  strip: { gap: spacing.sm },
});
