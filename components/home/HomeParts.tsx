import { type Href } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { Role } from '../../shared/schemas/auth';
import { roleLabels } from '../lab/roles';
import { colors, radius, spacing, type ColorName } from '../theme';

const roleTextColors: Record<Role, ColorName> = { designer: 'inkMuted', planner: 'amber', lead: 'emberPressed', operator: 'teal' };
import { Badge, Icon, LinkPressable, Text, type BadgeTone } from '../ui';

/** One block of home: a heading with whose work it is, then its rows or its empty state. */
export function HomeSection({
  id,
  title,
  role,
  count,
  countTone = 'neutral',
  action,
  children,
}: {
  id: string;
  title: string;
  role?: Role;
  count?: number;
  countTone?: BadgeTone;
  action?: React.ReactNode;
  children: React.ReactNode;
}) {
  return (
    <View style={styles.section} testID={`home-section-${id}`}>
      <View style={styles.head}>
        <View style={styles.headText}>
          <Text variant="overline" color={role ? roleTextColors[role] : 'inkMuted'}>
            {role ? `As ${roleLabels[role].toLowerCase()}` : 'For everyone'}
          </Text>
          <View style={styles.headTitle}>
            <Text variant="heading" accessibilityRole="header" style={{ flexShrink: 1 }}>
              {title}
            </Text>
            {count !== undefined ? <Badge label={String(count)} tone={count > 0 ? countTone : 'neutral'} testID={`home-${id}-count`} /> : null}
          </View>
        </View>
        {action}
      </View>
      {children}
    </View>
  );
}

/** A sub-heading inside a section ("Sent back to you", "Drafts"). */
export function SubHead({ children, note }: { children: string; note?: string }) {
  return (
    <View style={styles.subHead}>
      <Text variant="overline" color="inkMuted">
        {children}
      </Text>
      {note ? (
        <Text variant="caption" color="inkFaint">
          {note}
        </Text>
      ) : null}
    </View>
  );
}

/** A row that opens the place where its work is done. */
export function RowLink({
  href,
  testID,
  label,
  tone,
  children,
  side,
}: {
  href: Href;
  testID: string;
  label: string;
  tone?: 'danger' | 'amber';
  children: React.ReactNode;
  side?: React.ReactNode;
}) {
  return (
    <LinkPressable
      href={href}
      testID={testID}
      accessibilityLabel={label}
      style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
        styles.row,
        tone === 'danger' && styles.rowDanger,
        tone === 'amber' && styles.rowAmber,
        (pressed || hovered) && styles.rowHover,
      ]}
    >
      <View style={styles.rowMain}>{children}</View>
      {side ? <View style={styles.rowSide}>{side}</View> : null}
      <Icon name="chevron" size={18} color={colors.inkFaint} />
    </LinkPressable>
  );
}

/**
 * How far a line has got: printed (solid), planned but not yet printed
 * (lighter), still open (the track).
 */
export function ProgressBar({ quantity, planned, printed, testID }: { quantity: number; planned: number; printed: number; testID?: string }) {
  const q = Math.max(quantity, 1);
  const printedShare = Math.min(printed / q, 1);
  const plannedShare = Math.min(Math.max(planned - printed, 0) / q, 1 - printedShare);
  return (
    <View
      style={styles.track}
      testID={testID}
      accessibilityRole="progressbar"
      accessibilityLabel={`${printed} of ${quantity} printed, ${planned} planned`}
    >
      <View style={[styles.fillPrinted, { flexGrow: printedShare, flexBasis: 0 }]} />
      <View style={[styles.fillPlanned, { flexGrow: plannedShare, flexBasis: 0 }]} />
      <View style={{ flexGrow: Math.max(1 - printedShare - plannedShare, 0), flexBasis: 0 }} />
    </View>
  );
}

export function Legend() {
  return (
    <View style={styles.legend}>
      <View style={[styles.swatch, { backgroundColor: colors.teal }]} />
      <Text variant="caption" color="inkMuted">
        printed
      </Text>
      <View style={[styles.swatch, { backgroundColor: colors.amber, opacity: 0.45 }]} />
      <Text variant="caption" color="inkMuted">
        planned
      </Text>
      <View style={[styles.swatch, { backgroundColor: colors.powderDeep, borderWidth: 1, borderColor: colors.line }]} />
      <Text variant="caption" color="inkMuted">
        open
      </Text>
      <Text variant="caption" color="inkFaint" style={styles.legendNote}>
        figures: printed/planned/asked
      </Text>
    </View>
  );
}

export const homeStyles = StyleSheet.create({
  list: { gap: spacing.sm },
  meta: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', columnGap: spacing.sm, rowGap: spacing.xxs },
  titleLine: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
});

const styles = StyleSheet.create({
  section: { gap: spacing.md, minWidth: 0 },
  head: { flexDirection: 'row', alignItems: 'flex-end', justifyContent: 'space-between', gap: spacing.sm, minHeight: 44 },
  headText: { flexShrink: 1, gap: spacing.xxs },
  headTitle: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  subHead: { gap: spacing.xxs, marginTop: spacing.xs },
  row: {
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
  rowDanger: { borderLeftWidth: 4, borderLeftColor: colors.danger },
  rowAmber: { borderLeftWidth: 4, borderLeftColor: colors.amber },
  rowHover: { borderColor: colors.ember },
  rowMain: { flex: 1, minWidth: 0, gap: spacing.xs },
  rowSide: { alignItems: 'flex-end', gap: spacing.xs },
  track: { flexDirection: 'row', height: 8, borderRadius: radius.pill, overflow: 'hidden', backgroundColor: colors.powderDeep, flexGrow: 1 },
  fillPrinted: { backgroundColor: colors.teal },
  fillPlanned: { backgroundColor: colors.amber, opacity: 0.45 },
  legend: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, flexWrap: 'wrap' },
  legendNote: { marginLeft: spacing.sm },
  swatch: { width: 10, height: 10, borderRadius: 2, marginLeft: spacing.xs },
});
