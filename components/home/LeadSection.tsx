import { View } from 'react-native';
import type { PlanListItem } from '../../shared/schemas/plans';
import { roleLabels, sortRoles, roles } from '../lab/roles';
import { useLab } from '../lab/useCurrentLab';
import { useInvitesQuery } from '../queries/invites';
import { useMembersQuery } from '../queries/members';
import { usePlansQuery } from '../queries/plans';
import { fonts } from '../theme';
import { Badge, EmptyState, ErrorState, Figure, LoadingState, Text } from '../ui';
import { formatDateTime } from '../ui/format';
import { daysUntil, dueText } from '../requests/labels';
import { HomeSection, RowLink, SubHead, homeStyles } from './HomeParts';
import { relativeTime } from './time';

const IN_REVIEW = ['in_review'] as const;

/** Plans waiting for the lead's decision, the longest wait first, then the team at a glance. */
export function LeadSection({ nowMs }: { nowMs: number }) {
  const lab = useLab();
  const plans = usePlansQuery(lab.id, IN_REVIEW);
  const list = plans.data ? [...(plans.data as PlanListItem[])].sort((a, b) => a.updatedAt.localeCompare(b.updatedAt)) : [];
  return (
    <HomeSection id="lead" title="Plans to review" role="lead" countTone="ember" count={plans.data ? list.length : undefined}>
      {plans.isPending ? (
        <LoadingState label="Loading plans in review…" />
      ) : plans.isError ? (
        <ErrorState error={plans.error} onRetry={() => plans.refetch()} />
      ) : list.length === 0 ? (
        <EmptyState
          testID="home-lead-empty"
          title="No plans waiting for review"
          body="Plans a planner sends for review show here with their planner, machine and due date, to approve into a machine's queue or send back with a comment."
          who="Planners send them; you review them as a lead."
        />
      ) : (
        <View style={homeStyles.list} testID="home-review-list">
          {list.map((p) => (
            <RowLink
              key={p.id}
              href={`/review/${p.id}`}
              testID={`home-review-${p.id}`}
              label={`Review ${p.name}`}
            >
              <View style={homeStyles.titleLine}>
                <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
                  {p.name}
                </Text>
                {p.earliestDueDate ? <Badge label={`Due ${dueText(p.earliestDueDate, 'open')}`} tone={daysUntil(p.earliestDueDate) <= 2 ? 'danger' : 'amber'} /> : null}
              </View>
              <View style={homeStyles.meta}>
                <Text variant="caption" color="inkMuted">
                  by {p.createdBy?.name ?? 'a former member'} · {p.machine.name} · {p.material.name}
                </Text>
              </View>
              <View style={homeStyles.meta}>
                <Figure variant="caption" color="inkMuted">
                  {p.partCount} part{p.partCount === 1 ? '' : 's'} in {p.lineCount} line{p.lineCount === 1 ? '' : 's'}
                </Figure>
                <Text variant="caption" color="inkFaint">
                  sent {relativeTime(p.updatedAt, nowMs)}
                </Text>
              </View>
            </RowLink>
          ))}
        </View>
      )}
      <TeamSummary nowMs={nowMs} />
    </HomeSection>
  );
}

/** Members per role and the invites nobody has answered yet. */
function TeamSummary({ nowMs }: { nowMs: number }) {
  const lab = useLab();
  const members = useMembersQuery(lab.id);
  const invites = useInvitesQuery(lab.id, lab.isLead);
  const pending = (invites.data ?? []).filter((i) => !i.acceptedAt && Date.parse(i.expiresAt) > nowMs);
  return (
    <>
      <SubHead>Team</SubHead>
      {members.isPending ? (
        <LoadingState label="Loading members…" />
      ) : members.isError ? (
        <ErrorState error={members.error} onRetry={() => members.refetch()} />
      ) : (
        <RowLink href="/settings/members" testID="home-team-members" label={`Members: ${members.data.length}`}>
          <Text variant="bodyStrong">
            <Figure variant="figure" style={{ fontFamily: fonts.monoMedium }}>{members.data.length}</Figure> member{members.data.length === 1 ? '' : 's'}
          </Text>
          <Text variant="caption" color="inkMuted">
            {roles.map((r) => `${members.data.filter((m) => m.roles.includes(r)).length} ${roleLabels[r].toLowerCase()}`).join(' · ')}
          </Text>
        </RowLink>
      )}
      {invites.isPending ? null : invites.isError ? (
        <ErrorState error={invites.error} onRetry={() => invites.refetch()} />
      ) : (
        <RowLink
          href="/settings/invites"
          testID="home-team-invites"
          label={`Invites pending: ${pending.length}`}
          tone={pending.length > 0 ? 'amber' : undefined}
        >
          <Text variant="bodyStrong">
            {pending.length === 0 ? 'No invites pending' : `${pending.length} invite${pending.length === 1 ? '' : 's'} pending`}
          </Text>
          {pending.slice(0, 3).map((i) => (
            <Text key={i.id} variant="caption" color="inkMuted" numberOfLines={1}>
              {i.email} · {sortRoles(i.roles).map((r) => roleLabels[r]).join(', ')} · expires {formatDateTime(i.expiresAt)}
            </Text>
          ))}
          {pending.length > 3 ? (
            <Text variant="caption" color="inkFaint">
              and {pending.length - 3} more
            </Text>
          ) : null}
        </RowLink>
      )}
    </>
  );
}
