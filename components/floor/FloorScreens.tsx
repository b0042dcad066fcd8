import { useQueries } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useMachinesQuery } from '../queries/machines';
import { FLOOR_STATUSES, runQueryOptions, useMachineRunsQuery } from '../queries/runs';
import { colors, radius, spacing } from '../theme';
import { Badge, EmptyState, ErrorState, Icon, LinkPressable, LoadingState, Screen, Text } from '../ui';
import { floorOrder, UNDER_WAY } from '../../shared/floor';
import { STATUS_LABELS } from '../../shared/plans/status';
import type { PlanListItem } from '../../shared/schemas/plans';
import { FloorButton } from './controls';
import { RunCard } from './RunCard';

/** Pick a machine: each shows what is on it now. */
export function FloorPicker() {
  const lab = useLab();
  const machines = useMachinesQuery(lab.id);
  return (
    <Screen title="Floor" subtitle="Pick your machine to work its current or next run." testID="screen-floor" maxWidth={640}>
      {machines.isPending ? (
        <LoadingState label="Loading machines…" />
      ) : machines.isError ? (
        <ErrorState error={machines.error} onRetry={() => machines.refetch()} />
      ) : machines.data.length === 0 ? (
        <EmptyState
          testID="floor-empty"
          title="No machines yet"
          body="A lead adds the lab's machines in the settings; each then gets its run card here."
          who="Worked by operators at the machine."
        />
      ) : (
        <View style={{ gap: spacing.md }} testID="floor-machines">
          {machines.data.map((m) => (
            <MachineRow key={m.id} id={m.id} name={m.name} />
          ))}
        </View>
      )}
    </Screen>
  );
}

function MachineRow({ id, name }: { id: string; name: string }) {
  const lab = useLab();
  const runs = useMachineRunsQuery(lab.id, id);
  // The summary names the build furthest along (finishing before breakout before cooling before printing).
  const stageOf = new Map((runs.data ?? []).map((p) => [p.id, p.status]));
  const shown = runs.data ? floorOrder(runs.data as PlanListItem[], (planId) => -UNDER_WAY.indexOf(stageOf.get(planId)!)) : [];
  const first = shown[0];
  return (
    <LinkPressable
      href={`/floor/${id}`}
      testID={`floor-machine-${id}`}
      accessibilityLabel={`Machine ${name}`}
      style={({ pressed }: { pressed: boolean }) => [styles.machine, pressed && styles.machinePressed]}
    >
      <View style={{ flex: 1, gap: spacing.xxs }}>
        <Text variant="title">{name}</Text>
        <Text variant="body" color="inkMuted">
          {runs.isPending ? 'Loading…' : runs.isError ? 'Runs could not be loaded' : first ? `${first.status === 'queued' ? 'Next' : STATUS_LABELS[first.status]}: ${first.name}` : 'Nothing queued'}
        </Text>
      </View>
      {first ? <Badge label={STATUS_LABELS[first.status]} tone={first.status === 'queued' ? 'teal' : 'ember'} /> : null}
      <Icon name="chevron" size={22} color={colors.inkFaint} />
    </LinkPressable>
  );
}

/** One machine's floor: a card per run under way and one for the next build, each refreshed every few seconds. */
export function MachineFloor({ machineId }: { machineId: string }) {
  const lab = useLab();
  const machines = useMachinesQuery(lab.id);
  const runs = useMachineRunsQuery(lab.id, machineId);
  const machine = machines.data?.find((m) => m.id === machineId);
  // The cards in the queue's order (docs/api.md, "The floor"): builds under way in the order they started, then the
  // next queued one. The start times come from the runs the cards read anyway (one request each, shared).
  const listed = useMemo(() => (runs.data ? (runs.data as PlanListItem[]).filter((p) => FLOOR_STATUSES.includes(p.status)) : []), [runs.data]);
  const runViews = useQueries({ queries: listed.filter((p) => p.status !== 'queued').map((p) => runQueryOptions(lab.id, p.id)) });
  const startedKey = runViews.map((q) => `${q.data?.planId}:${q.data?.startedAt}`).join(',');
  const startsKnown = runViews.every((q) => q.data || q.isError);
  const shownNow = useMemo(() => {
    const started = new Map(runViews.filter((q) => q.data).map((q) => [q.data!.planId, q.data!.startedAt ? Date.parse(q.data!.startedAt) : null]));
    return floorOrder(listed, (id) => started.get(id)).map((p) => p.id);
    // startedKey stands for runViews' start times; the array itself is new on every render.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [listed, startedKey]);
  // A run that leaves the list (done, aborted, or taken by another phone) keeps its card until it is cleared, so its end is seen.
  const [kept, setKept] = useState<string[]>([]);
  const [cleared, setCleared] = useState<string[]>([]);
  useEffect(() => {
    setKept((k) => {
      const add = shownNow.filter((id) => !k.includes(id));
      return add.length ? [...k, ...add] : k;
    });
  }, [shownNow]);
  const ended = kept.filter((id) => !shownNow.includes(id) && !cleared.includes(id));

  const back = (
    <LinkPressable href="/floor" testID="floor-back" style={{ minHeight: 48, justifyContent: 'center' }}>
      <Text variant="bodyStrong" color="emberPressed">
        ‹ All machines
      </Text>
    </LinkPressable>
  );
  return (
    <Screen title={machine?.name ?? 'Machine'} subtitle="The current and next run at this machine." above={back} testID="screen-floor-machine" maxWidth={640}>
      {runs.isPending || !startsKnown ? (
        <LoadingState label="Loading runs…" />
      ) : runs.isError && !runs.data ? (
        <ErrorState error={runs.error} onRetry={() => runs.refetch()} />
      ) : (
        <View style={{ gap: spacing.xl }}>
          {ended.map((id) => (
            <View key={id} style={{ gap: spacing.sm }}>
              <RunCard planId={id} />
              <FloorButton label="Clear this card" tone="secondary" onPress={() => setCleared((c) => [...c, id])} testID={`run-clear-${id}`} />
            </View>
          ))}
          {shownNow.length === 0 && ended.length === 0 ? (
            <EmptyState
              testID="floor-machine-empty"
              title="No run to work on"
              body="When a lead approves a plan for this machine, its run appears here with the pre-print checklist, timers, cautions and part counts."
              who="Leads queue them; operators run them."
            />
          ) : null}
          {shownNow.map((id) => (
            <RunCard key={id} planId={id} />
          ))}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  machine: {
    minHeight: 72,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    padding: spacing.lg,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.line,
    backgroundColor: colors.surface,
  },
  machinePressed: { backgroundColor: colors.powderDeep },
});
