import { router } from 'expo-router';
import { View } from 'react-native';
import type { PlanListItem } from '../../shared/schemas/plans';
import { useLab } from '../lab/useCurrentLab';
import { usePlanQuery, usePlansQuery } from '../queries/plans';
import type { LabRequest } from '../queries/requests';
import { fonts } from '../theme';
import { Badge, Button, EmptyState, ErrorState, Figure, LoadingState, Text } from '../ui';
import { formatDateTime } from '../ui/format';
import { PRIORITY_LABELS, PRIORITY_TONES, daysUntil, dueText } from '../requests/labels';
import { HomeSection, RowLink, SubHead, homeStyles } from './HomeParts';

type Q = { data?: LabRequest[]; isPending: boolean; error: Error | null; refetch: () => unknown };

const MY_PLAN_STATUSES = ['changes_requested', 'draft'] as const;

/** Parts of a request that no plan holds yet. */
export function unplannedCount(r: LabRequest): number {
  return r.lines.reduce((n, l) => n + Math.max(l.quantity - l.plannedCount, 0), 0);
}

/**
 * The planner's queue of work: open requests with parts still to place (in
 * the order the list route gives: soonest due, then most urgent), and the
 * planner's own plans that came back from review or are still drafts.
 */
export function PlannerSection({ requests, meId }: { requests: Q; meId: string | undefined }) {
  const toPlan = (requests.data ?? []).filter((r) => unplannedCount(r) > 0);
  return (
    <HomeSection
      id="planner"
      title="Requests to plan"
      role="planner"
      countTone="amber"
      count={requests.data ? toPlan.length : undefined}
      action={<Button label="New plan" size="sm" variant="secondary" testID="home-plan-new" onPress={() => router.push('/plans/new')} />}
    >
      {requests.isPending ? (
        <LoadingState label="Loading open requests…" />
      ) : requests.error ? (
        <ErrorState error={requests.error} onRetry={() => requests.refetch()} />
      ) : toPlan.length === 0 ? (
        <EmptyState
          testID="home-planner-empty"
          title="Every open request is planned"
          body="Open requests with parts that no plan holds yet show here, the soonest due first and the most urgent first on the same day."
          who="Designers file them; you pack them into builds as a planner."
        />
      ) : (
        <View style={homeStyles.list} testID="home-toplan-list">
          {toPlan.map((r) => (
            <ToPlanRow key={r.id} request={r} />
          ))}
        </View>
      )}
      <MyPlans meId={meId} />
    </HomeSection>
  );
}

function ToPlanRow({ request: r }: { request: LabRequest }) {
  const open = unplannedCount(r);
  const days = daysUntil(r.dueDate);
  return (
    <RowLink
      href={`/requests/${r.id}`}
      testID={`home-toplan-${r.id}`}
      label={`Plan ${r.title}: ${open} of ${r.totals.quantity} unplanned`}
      tone={days < 0 ? 'danger' : undefined}
      side={
        <>
          <Figure variant="heading" style={{ fontFamily: fonts.monoMedium }} testID={`home-toplan-${r.id}-open`}>
            {open.toLocaleString('en-US')}
          </Figure>
          <Text variant="caption" color="inkMuted">
            of {r.totals.quantity.toLocaleString('en-US')} to plan
          </Text>
        </>
      }
    >
      <View style={homeStyles.titleLine}>
        <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
          {r.title}
        </Text>
        <Badge label={PRIORITY_LABELS[r.priority]} tone={PRIORITY_TONES[r.priority]} />
      </View>
      <View style={homeStyles.meta}>
        <Figure variant="caption" color={days < 0 ? 'danger' : days <= 2 ? 'amber' : 'inkMuted'}>
          Due {dueText(r.dueDate, r.status)}
        </Figure>
        <Text variant="caption" color="inkFaint">
          {r.materialName ?? 'no material'} · {r.lines.length} line{r.lines.length === 1 ? '' : 's'} · by {r.createdBy?.name ?? 'a former member'}
        </Text>
      </View>
    </RowLink>
  );
}

/** The planner's own plans: sent back first (the lead is waiting on them), then drafts. */
function MyPlans({ meId }: { meId: string | undefined }) {
  const lab = useLab();
  const plans = usePlansQuery(lab.id, MY_PLAN_STATUSES);
  if (plans.isPending) return <LoadingState label="Loading your plans…" />;
  if (plans.isError) return <ErrorState error={plans.error} onRetry={() => plans.refetch()} />;
  const mine = (plans.data as PlanListItem[]).filter((p) => p.createdBy?.id === meId);
  const sentBack = mine.filter((p) => p.status === 'changes_requested');
  const drafts = mine.filter((p) => p.status === 'draft');
  return (
    <>
      <SubHead note="Plans a lead returned with a comment. Change them and send them again.">{`Sent back to you (${sentBack.length})`}</SubHead>
      {sentBack.length === 0 ? (
        <Text variant="caption" color="inkFaint" testID="home-sentback-empty">
          No plan of yours is waiting for changes.
        </Text>
      ) : (
        <View style={homeStyles.list}>
          {sentBack.map((p) => (
            <SentBackRow key={p.id} plan={p} />
          ))}
        </View>
      )}
      <SubHead>{`Your drafts (${drafts.length})`}</SubHead>
      {drafts.length === 0 ? (
        <Text variant="caption" color="inkFaint" testID="home-drafts-empty">
          No drafts. A new plan starts from open request lines.
        </Text>
      ) : (
        <View style={homeStyles.list}>
          {drafts.map((p) => (
            <RowLink key={p.id} href={`/plans/${p.id}`} testID={`home-draft-${p.id}`} label={`Open draft ${p.name}`}>
              <Text variant="bodyStrong">{p.name}</Text>
              <PlanMeta plan={p} />
            </RowLink>
          ))}
        </View>
      )}
    </>
  );
}

function PlanMeta({ plan: p }: { plan: PlanListItem }) {
  return (
    <View style={homeStyles.meta}>
      <Text variant="caption" color="inkMuted">
        {p.machine.name} · {p.material.name} · {p.partCount} part{p.partCount === 1 ? '' : 's'} · {p.layoutCount} layout{p.layoutCount === 1 ? '' : 's'}
      </Text>
      {p.earliestDueDate ? (
        <Figure variant="caption" color={daysUntil(p.earliestDueDate) <= 2 ? 'amber' : 'inkMuted'}>
          Due {dueText(p.earliestDueDate, 'open')}
        </Figure>
      ) : null}
    </View>
  );
}

/** A sent-back plan with the lead's comment, read from the plan's history. */
function SentBackRow({ plan: p }: { plan: PlanListItem }) {
  const lab = useLab();
  const detail = usePlanQuery(lab.id, p.id);
  const back = detail.data?.events.filter((e) => e.to === 'changes_requested').pop();
  return (
    <RowLink href={`/plans/${p.id}`} testID={`home-sentback-${p.id}`} label={`Change ${p.name}`} tone="amber">
      <View style={homeStyles.titleLine}>
        <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
          {p.name}
        </Text>
        <Badge label="Changes requested" tone="amber" />
      </View>
      <PlanMeta plan={p} />
      {back ? (
        <Text variant="caption" color="ink" testID={`home-sentback-${p.id}-comment`}>
          {back.by?.name ?? 'A lead'}, {formatDateTime(back.at)}: “{back.comment || 'no comment'}”
        </Text>
      ) : detail.isError ? (
        <Text variant="caption" color="danger">
          The lead’s comment could not be loaded; it is in the plan’s history.
        </Text>
      ) : null}
    </RowLink>
  );
}
