import { type Href } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { PlanListItem } from '../../shared/schemas/plans';
import { roleLabels, roleTones, sortRoles } from '../lab/roles';
import { useLab } from '../lab/useCurrentLab';
import { useLabQueuesQuery } from '../queries/home';
import { useMachinesQuery } from '../queries/machines';
import { useMaterialsQuery } from '../queries/materials';
import { useMeQuery } from '../queries/me';
import { useMembersQuery } from '../queries/members';
import { useInvitesQuery } from '../queries/invites';
import { usePlansQuery } from '../queries/plans';
import { useRequestsQuery, type RequestListParams } from '../queries/requests';
import { colors, radius, spacing, useIsWide } from '../theme';
import { Badge, Figure, Icon, LinkPressable, Screen, Text } from '../ui';
import { DesignerSection } from './DesignerSection';
import { LateSection } from './LateSection';
import { LeadSection } from './LeadSection';
import { OperatorSection } from './OperatorSection';
import { PlannerSection } from './PlannerSection';
import { PowderHomeSection } from './PowderHomeSection';
import { findLateRequests } from './late';

/** The open requests in the planner's order: soonest due, the most urgent first on the same day. */
const OPEN_REQUESTS: RequestListParams = { status: 'open', sort: 'dueDate', pageSize: 200 };
const FINISHING = ['finishing'] as const;

/** The clock home's relative times and past-due checks follow, a minute at a time. */
function useNowMs(stepMs = 60_000): number {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const t = setInterval(() => setNow(Date.now()), stepMs);
    return () => clearInterval(t);
  }, [stepMs]);
  return now;
}

export function HomeScreen() {
  const lab = useLab();
  const { data: me } = useMeQuery();
  const wide = useIsWide();
  const nowMs = useNowMs();
  const firstName = me?.user.name.split(/\s+/)[0] ?? '';

  const requests = useRequestsQuery(lab.id, OPEN_REQUESTS);
  const machines = useMachinesQuery(lab.id);
  const machineIds = useMemo(() => (machines.data ?? []).map((m) => m.id), [machines.data]);
  const queues = useLabQueuesQuery(lab.id, machineIds);
  const finishing = usePlansQuery(lab.has('operator') ? lab.id : undefined, FINISHING);

  const openRequests = requests.data?.items ?? [];
  const mine = openRequests.filter((r) => r.createdBy?.id === me?.user.id);
  const late = findLateRequests(
    queues.flatMap((q) => (q.data ? [q.data] : [])),
    openRequests,
    nowMs,
  );
  const machineNames = new Map((machines.data ?? []).map((m) => [m.id, m.name] as const));
  const requestsState = { isPending: requests.isPending, error: requests.error, refetch: requests.refetch };
  const requestsTruncated = !!requests.data && requests.data.total > requests.data.items.length;

  const sections: { key: string; node: React.ReactNode }[] = [];
  const lateNode = { key: 'late', node: <LateSection late={late} requests={requestsState} machines={machines} queues={machines.data ? queues : []} machineNames={machineNames} /> };
  // Something late is what needs everyone first.
  if (late.length > 0) sections.push(lateNode);
  if (lab.has('designer')) sections.push({ key: 'designer', node: <DesignerSection requests={{ ...requestsState, data: requests.data ? mine : undefined }} /> });
  if (lab.has('planner')) sections.push({ key: 'planner', node: <PlannerSection requests={{ ...requestsState, data: requests.data ? openRequests : undefined }} meId={me?.user.id} /> });
  if (lab.has('lead')) sections.push({ key: 'lead', node: <LeadSection nowMs={nowMs} /> });
  if (lab.has('lead')) sections.push({ key: 'powder', node: <PowderHomeSection /> });
  if (lab.has('operator'))
    sections.push({
      key: 'operator',
      node: <OperatorSection machines={machines} queues={queues} finishing={(finishing.data as PlanListItem[] | undefined) ?? []} nowMs={nowMs} />,
    });
  if (late.length === 0) sections.push(lateNode);

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

      {requestsTruncated ? (
        <Text variant="caption" color="inkFaint" testID="home-requests-truncated">
          Showing the {requests.data!.items.length} soonest due of {requests.data!.total} open requests; Requests lists them all.
        </Text>
      ) : null}

      {wide ? (
        // Two columns filled in turn, so a long section does not leave a hole beside a short one.
        <View style={styles.columns}>
          {[0, 1].map((col) => (
            <View key={col} style={styles.column}>
              {sections
                .filter((_, i) => i % 2 === col)
                .map((s) => (
                  <View key={s.key}>{s.node}</View>
                ))}
            </View>
          ))}
        </View>
      ) : (
        <View style={styles.grid}>
          {sections.map((s) => (
            <View key={s.key}>{s.node}</View>
          ))}
        </View>
      )}
    </Screen>
  );
}

/** The lab's machines, materials and members as counts that lead to their settings. */
function LabFigures() {
  const lab = useLab();
  // On a phone the three counts share one row, so the work below starts on the first screen.
  const wide = useIsWide();
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
        <LinkPressable
          key={it.key}
          href={it.href}
          testID={`home-${it.key}`}
          accessibilityRole="link"
          accessibilityLabel={`${it.label}: ${it.q.data?.length ?? 'loading'}`}
          style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [styles.figure, !wide && styles.figureNarrow, (pressed || hovered) && styles.figureHover]}
        >
          <Text variant="overline" color="inkMuted">
            {it.label}
          </Text>
          <Figure variant={wide ? 'figureLarge' : 'title'} testID={`home-${it.key}-count`} color={it.q.isError ? 'danger' : 'ink'}>
            {it.q.isError ? '!' : it.q.data ? String(it.q.data.length) : '–'}
          </Figure>
          {wide ? (
            <View style={styles.figureFoot}>
              <Text variant="caption" color="inkFaint" style={{ flexShrink: 1 }}>
                {it.q.isError ? 'could not be loaded' : it.note}
              </Text>
              <Icon name="chevron" size={16} color={colors.inkFaint} />
            </View>
          ) : it.q.isError ? (
            <Text variant="caption" color="danger">
              not loaded
            </Text>
          ) : null}
        </LinkPressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  roles: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
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
  figureNarrow: { flexBasis: 0, padding: spacing.md, borderRadius: radius.md, gap: 0 },
  figureHover: { borderColor: colors.ember },
  figureFoot: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.xs },
  grid: { gap: spacing.xl },
  columns: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.xl },
  column: { flex: 1, minWidth: 0, gap: spacing.xl },
});
