import { type Href } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { Role } from '../api/schemas';
import { roleLabels, roleTones, sortRoles } from '../lab/roles';
import { useLab } from '../lab/useCurrentLab';
import { useMachinesQuery } from '../queries/machines';
import { useMaterialsQuery } from '../queries/materials';
import { useMeQuery } from '../queries/me';
import { useMembersQuery } from '../queries/members';
import { useInvitesQuery } from '../queries/invites';
import { ReviewList } from '../review/ReviewList';
import { colors, radius, spacing, useIsWide } from '../theme';
import { Badge, EmptyState, Figure, Icon, LinkPressable, Screen, Text } from '../ui';

type Section = {
  key: string;
  role?: Role;
  title: string;
  empty: { title: string; body: string; who: string };
};

/** What each role is waiting on; "late requests" concern everyone. */
const sections: Section[] = [
  {
    key: 'designer',
    role: 'designer',
    title: 'My requests',
    empty: {
      title: 'No requests of yours are open',
      body: 'Requests you file show here with how many of each part are planned and printed, and their due dates.',
      who: 'You file them as a designer, from Requests.',
    },
  },
  {
    key: 'planner',
    role: 'planner',
    title: 'Requests to plan',
    empty: {
      title: 'No requests waiting for a build',
      body: 'Open request lines that no plan covers yet show here, the earliest due date first.',
      who: 'Designers file them; you pack them as a planner.',
    },
  },
  {
    key: 'lead',
    role: 'lead',
    title: 'Plans to review',
    empty: {
      title: 'No plans waiting for review',
      body: 'Plans a planner sends for review show here with their chosen layout, to approve into a queue or send back with a comment.',
      who: 'Planners send them; you review them as a lead.',
    },
  },
  {
    key: 'operator',
    role: 'operator',
    title: 'Next runs on my machines',
    empty: {
      title: 'No runs are due',
      body: 'The next approved build of each machine shows here with its predicted start, so you can prepare powder and the chamber.',
      who: 'Leads queue them; you run them as an operator.',
    },
  },
  {
    key: 'late',
    title: 'Late requests',
    empty: {
      title: 'Nothing is late',
      body: 'Requests whose predicted finish falls after their due date show here, so the lab can re-plan or tell the designer early.',
      who: 'Flagged from the queue’s predicted times.',
    },
  },
];

export function HomeScreen() {
  const lab = useLab();
  const { data: me } = useMeQuery();
  const wide = useIsWide();
  const mine = sections.filter((s) => !s.role || lab.has(s.role));
  const firstName = me?.user.name.split(/\s+/)[0] ?? '';

  return (
    <Screen title={firstName ? `Hello, ${firstName}` : 'Home'} subtitle={`What needs you now in ${lab.name}.`} testID="screen-home">
      <View style={styles.roles} testID="home-roles">
        <Text variant="label" color="inkMuted">
          Your roles
        </Text>
        {sortRoles(lab.roles).map((r) => (
          <Badge key={r} label={roleLabels[r]} tone={roleTones[r]} testID={`home-role-${r}`} />
        ))}
      </View>

      <LabFigures />

      <View style={[styles.grid, wide && styles.gridWide]}>
        {mine.map((s) => (
          <View key={s.key} style={[styles.section, wide && styles.sectionWide]} testID={`home-section-${s.key}`}>
            <View style={styles.sectionHead}>
              <Text variant="heading" accessibilityRole="header">
                {s.title}
              </Text>
              {s.role ? <Badge label={roleLabels[s.role]} tone={roleTones[s.role]} /> : <Badge label="Everyone" />}
            </View>
            {s.key === 'lead' ? <ReviewList compact /> : <EmptyState title={s.empty.title} body={s.empty.body} who={s.empty.who} />}
          </View>
        ))}
      </View>
    </Screen>
  );
}

/** The lab's machines, materials and members as counts that lead to their settings. */
function LabFigures() {
  const lab = useLab();
  const machines = useMachinesQuery(lab.id);
  const materials = useMaterialsQuery(lab.id);
  const members = useMembersQuery(lab.id);
  const invites = useInvitesQuery(lab.id, lab.isLead);
  const pendingInvites = invites.data?.filter((i) => !i.acceptedAt && new Date(i.expiresAt).getTime() > Date.now()).length ?? 0;
  const membersNote = !lab.isLead
    ? 'people in the lab'
    : pendingInvites > 0
      ? `${pendingInvites} invite${pendingInvites === 1 ? '' : 's'} pending`
      : 'manage roles and invites';
  const items: { key: string; label: string; q: { data?: unknown[]; isError: boolean }; href: Href; note: string }[] = [
    { key: 'machines', label: 'Machines', q: machines, href: '/settings/machines', note: 'powder-bed printers' },
    { key: 'materials', label: 'Materials', q: materials, href: '/settings/materials', note: 'powders in use' },
    { key: 'members', label: 'Members', q: members, href: '/settings/members', note: membersNote },
  ];
  return (
    <View style={styles.figures} testID="home-section-lab">
      {items.map((it) => (
        <LinkPressable key={it.key} href={it.href}
            testID={`home-${it.key}`}
            accessibilityRole="link"
            accessibilityLabel={`${it.label}: ${it.q.data?.length ?? 'loading'}`}
            style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [styles.figure, (pressed || hovered) && styles.figureHover]}
          >
            <Text variant="overline" color="inkMuted">
              {it.label}
            </Text>
            <Figure variant="figureLarge" testID={`home-${it.key}-count`} color={it.q.isError ? 'danger' : 'ink'}>
              {it.q.isError ? '!' : it.q.data ? String(it.q.data.length) : '–'}
            </Figure>
            <View style={styles.figureFoot}>
              <Text variant="caption" color="inkFaint" style={{ flexShrink: 1 }}>
                {it.q.isError ? 'could not be loaded' : it.note}
              </Text>
              <Icon name="chevron" size={16} color={colors.inkFaint} />
            </View>
          </LinkPressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  roles: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  figure: {
    flexGrow: 1,
    flexBasis: 150,
    minHeight: 48,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.lg,
    padding: spacing.lg,
    gap: spacing.xs,
  },
  figureHover: { borderColor: colors.ember },
  figureFoot: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.xs },
  grid: { gap: spacing.xl },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xl },
  section: { gap: spacing.md },
  sectionWide: { flexBasis: 420, flexGrow: 1 },
  sectionHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm },
});
