import { router } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { useMachinesQuery } from '../queries/machines';
import { useQueueQuery, useReorderQueueMutation, useUndoQueueMoveMutation } from '../queries/queue';
import { UndoNotice } from '../review/UndoNotice';
import { BuildFileLinks } from '../review/BuildFileLinks';
import { calibrationNote } from '../review/calibration';
import { colors, radius, spacing, useIsWide, type ColorName } from '../theme';
import { Badge, Button, EmptyState, ErrorState, LinkPressable, LoadingState, Notice, Screen, Text } from '../ui';
import { formatDate } from '../ui/format';
import { STATUS_LABELS } from '../../shared/plans/status';
import type { QueueItemView, QueueView } from '../../shared/schemas/runs';
import { CalibrationPanel } from './CalibrationPanel';
import { ReorderList } from './ReorderList';
import { dueEndMs, moved } from './reschedule';
import { formatMoment, timeTicks } from './timeAxis';

/** The lab's machines as tabs, and the chosen machine's queue on a timeline. */
export function QueueScreen({ machineId }: { machineId?: string }) {
  const lab = useLab();
  const machines = useMachinesQuery(lab.id);
  const chosen = machines.data?.find((m) => m.id === machineId) ?? machines.data?.[0];
  return (
    <Screen title="Queue" subtitle={`Each machine of ${lab.name} with its approved builds in order and their predicted times.`} testID="screen-queue" maxWidth={1320}>
      {machines.isPending ? (
        <LoadingState label="Loading machines…" />
      ) : machines.isError ? (
        <ErrorState error={machines.error} onRetry={() => machines.refetch()} />
      ) : !chosen ? (
        <EmptyState testID="queue-empty" title="No machines yet" body="A lead adds the lab's machines in the settings; approved plans then line up here per machine." who="Ordered by leads." />
      ) : (
        <>
          <View style={styles.tabs} accessibilityRole="tablist">
            {machines.data.map((m) => (
              <Pressable
                key={m.id}
                accessibilityRole="tab"
                accessibilityState={{ selected: m.id === chosen.id }}
                aria-selected={m.id === chosen.id}
                testID={`queue-machine-${m.id}`}
                onPress={() => router.setParams({ machine: m.id })}
                style={[styles.tab, m.id === chosen.id && styles.tabOn]}
              >
                <Text variant="bodyStrong" color={m.id === chosen.id ? 'onEmber' : 'ink'}>
                  {m.name}
                </Text>
              </Pressable>
            ))}
          </View>
          <MachineQueue key={chosen.id} machineId={chosen.id} />
        </>
      )}
    </Screen>
  );
}

function MachineQueue({ machineId }: { machineId: string }) {
  const lab = useLab();
  const queue = useQueueQuery(lab.id, machineId);
  const reorder = useReorderQueueMutation(lab.id, machineId);
  const undoMove = useUndoQueueMoveMutation(lab.id, machineId);
  const [showRuns, setShowRuns] = useState(false);
  if (queue.isPending) return <LoadingState label="Loading the queue…" />;
  if (queue.isError && !queue.data) return <ErrorState error={queue.error} onRetry={() => queue.refetch()} />;
  const view = queue.data as QueueView;
  const ids = view.plans.map((p) => p.planId);
  const byId = new Map(view.plans.map((p) => [p.planId, p]));
  const canOrder = lab.isLead;
  const move = (from: number, to: number) => {
    if (!canOrder || reorder.isPending) return;
    undoMove.reset();
    reorder.mutate(moved(ids, from, to));
  };
  // Every build still holding a chamber (two with a spare chamber: one printing, one cooling outside); older servers send only the one on the machine.
  const underWay = (view as QueueView & { active?: QueueItemView[] }).active ?? (view.current ? [view.current] : []);
  const late = view.plans.filter((p) => p.late).length + underWay.filter((p) => p.late).length;
  const changes = view.plans.filter((p) => p.materialChange).length;

  return (
    <View style={{ gap: spacing.lg }} testID={`queue-${machineId}`}>
      <View style={styles.summary}>
        <Text variant="heading">{view.machine.name}</Text>
        <Text variant="label" color="inkMuted">
          {view.machine.chamberCount} chamber{view.machine.chamberCount === 1 ? '' : 's'}
          {view.machine.chamberCount > 1 ? ': the next build starts while the last one cools outside' : ': the next build waits until the last one is broken out'}
        </Text>
        <Badge label={calibrationNote(view.calibration)} tone={view.calibration.calibrated ? 'teal' : 'neutral'} testID="queue-calibration" />
        {late > 0 ? <Badge label={`${late} late`} tone="danger" testID="queue-late-count" /> : null}
        {changes > 0 ? <Badge label={`${changes} material change${changes === 1 ? '' : 's'}`} tone="amber" testID="queue-material-changes" /> : null}
        <Button
          label={showRuns ? 'Hide the runs' : 'Estimates against the runs'}
          variant="secondary"
          size="sm"
          onPress={() => setShowRuns((v) => !v)}
          testID="queue-calibration-toggle"
        />
      </View>
      {showRuns ? <CalibrationPanel machineId={machineId} /> : null}
      {reorder.isError ? (
        <Notice tone="danger" title="The new order was not saved" testID="queue-reorder-error">
          {`${reorder.error.message}${isApiError(reorder.error) && reorder.error.status === 400 ? ' The queue is shown as the server has it.' : ''}`}
        </Notice>
      ) : null}
      {reorder.isSuccess && reorder.data.move ? (
        <UndoNotice
          title="New order saved"
          until={reorder.data.move.undoUntil}
          undoLabel="Undo move"
          onUndo={() => undoMove.mutate(reorder.data.move!.id, { onSuccess: () => reorder.reset() })}
          pending={undoMove.isPending}
          error={undoMove.error?.message}
          testID="queue-moved"
        >
          The times below follow the new order.
        </UndoNotice>
      ) : null}
      {undoMove.isSuccess ? (
        <Notice tone="info" title="Move undone" testID="queue-move-undone">
          The queue is back in the order before the move.
        </Notice>
      ) : null}
      {underWay.length > 0 || view.plans.length > 0 ? <Timeline underWay={underWay} plans={view.plans} nowIso={view.now} /> : null}
      {underWay.length > 0 ? (
        <View style={{ gap: spacing.sm }}>
          <Text variant="overline" color="inkMuted">
            Under way
          </Text>
          {underWay.map((item, i) => (
            <QueueRow key={item.planId} item={item} index={null} testID={i === 0 ? 'queue-current' : `queue-current-${i}`} />
          ))}
        </View>
      ) : null}
      {view.plans.length === 0 ? (
        <EmptyState
          testID="queue-empty"
          title="Nothing queued"
          body="Plans a lead approves for this machine line up here with predicted start, finish and cooled times, and a flag on those that will be late."
          who="Ordered by leads; followed by planners and operators."
        />
      ) : (
        <View style={{ gap: spacing.sm }}>
          <Text variant="overline" color="inkMuted">
            Queued, in order{canOrder ? ' · drag a row or use its arrows to reorder' : ''}
          </Text>
          <ReorderList
            ids={ids}
            onMove={move}
            disabled={!canOrder}
            gap={spacing.sm}
            testID="queue-list"
            renderItem={(id, i) => (
              <QueueRow
                item={byId.get(id)!}
                index={i}
                testID={`queue-item-${i}`}
                controls={
                  canOrder ? (
                    <View style={styles.arrows}>
                      <Button label="↑" variant="secondary" accessibilityLabel={`Move ${byId.get(id)!.name} up`} disabled={i === 0} onPress={() => move(i, i - 1)} testID={`queue-up-${i}`} />
                      <Button label="↓" variant="secondary" accessibilityLabel={`Move ${byId.get(id)!.name} down`} disabled={i === ids.length - 1} onPress={() => move(i, i + 1)} testID={`queue-down-${i}`} />
                    </View>
                  ) : null
                }
              />
            )}
          />
        </View>
      )}
    </View>
  );
}

/** Width of a lane's label on a wide screen (two lines of a plan's name). */
const LABEL_WIDTH = 140;

const STAGE_COLOURS: Array<{ key: string; label: string; colour: ColorName }> = [
  { key: 'preheat', label: 'Preheat', colour: 'amber' },
  { key: 'print', label: 'Print', colour: 'ember' },
  { key: 'inMachine', label: 'Cooling in the machine', colour: 'danger' },
  { key: 'outside', label: 'Cooling outside', colour: 'teal' },
  { key: 'breakout', label: 'Breakout', colour: 'graphiteRaised' },
];

function segments(item: QueueItemView): Array<{ from: number; to: number; colour: ColorName; key: string }> {
  const start = Date.parse(item.startAt);
  const preheatEnd = Math.min(Date.parse(item.printEndAt), start + item.durations.preheatSeconds * 1000);
  const marks = [start, preheatEnd, Date.parse(item.printEndAt), Date.parse(item.leavesMachineAt), Date.parse(item.cooledAt), Date.parse(item.breakoutDoneAt)];
  return STAGE_COLOURS.map((s, i) => ({ from: marks[i], to: marks[i + 1], colour: s.colour, key: s.key }));
}

/** Every build's stages on one time axis, one lane per build, with its due date marked. */
function Timeline({ underWay, plans, nowIso }: { underWay: QueueItemView[]; plans: QueueItemView[]; nowIso: string }) {
  const wide = useIsWide();
  const items = useMemo(() => [...underWay, ...plans], [underWay, plans]);
  const { from, to } = useMemo(() => {
    const starts = items.map((p) => Date.parse(p.startAt));
    const ends = items.map((p) => Date.parse(p.breakoutDoneAt));
    const f = Math.min(Date.parse(nowIso), ...starts);
    // The axis spans the work, not the due dates: a due date months away would squeeze every bar to a sliver.
    const last = Math.max(f + 3_600_000, ...ends);
    return { from: f, to: last + (last - f) * 0.05 };
  }, [items, nowIso]);
  const nowMs = Date.parse(nowIso);
  // Room for a label every 90 px or so: about 4 ticks on a phone, 8 on a wide screen.
  const ticks = useMemo(() => timeTicks(from, to, wide ? 8 : 4), [from, to, wide]);
  const pct = (ms: number) => `${(((Math.min(to, Math.max(from, ms)) - from) / (to - from)) * 100).toFixed(3)}%` as `${number}%`;
  const widthPct = (a: number, b: number) => `${((Math.max(0, Math.min(to, b) - Math.max(from, a)) / (to - from)) * 100).toFixed(3)}%` as `${number}%`;
  return (
    <View style={styles.timeline} testID="queue-timeline" accessibilityLabel="Timeline of the queue">
      <Text variant="caption" color="inkMuted" testID="queue-now">
        {`Now ${formatMoment(nowMs)} (the red line)`}
      </Text>
      {items.map((p) => (
        <View key={p.planId} style={wide ? styles.lane : styles.laneNarrow}>
          <Text variant="caption" numberOfLines={2} style={wide ? styles.laneLabel : undefined}>
            {p.name}
          </Text>
          <View style={styles.laneTrack}>
            {segments(p).map((s) => (
              <View key={s.key} style={[styles.segment, { left: pct(s.from), width: widthPct(s.from, s.to), backgroundColor: colors[s.colour] }]} />
            ))}
            <View style={[styles.now, { left: pct(nowMs) }]} />
            {p.earliestDueDate && dueEndMs(p.earliestDueDate) <= to ? (
              <View style={[styles.due, { left: pct(dueEndMs(p.earliestDueDate)) }, p.late && { backgroundColor: colors.danger }]} />
            ) : null}
          </View>
        </View>
      ))}
      <View style={[styles.axisTrack, wide && { marginLeft: LABEL_WIDTH + 8 }]} testID="queue-axis">
        {ticks.map((t) => (
          <View key={t.atMs} style={[styles.tick, { left: pct(t.atMs) }]}>
            <View style={[styles.tickMark, t.day && styles.tickMarkDay]} />
            <Text variant="caption" color={t.day ? 'ink' : 'inkMuted'} style={styles.tickLabel} numberOfLines={1}>
              {t.label}
            </Text>
          </View>
        ))}
      </View>
      <View style={styles.legend}>
        {STAGE_COLOURS.map((s) => (
          <View key={s.key} style={styles.legendItem}>
            <View style={[styles.legendSwatch, { backgroundColor: colors[s.colour] }]} />
            <Text variant="caption" color="inkMuted">
              {s.label}
            </Text>
          </View>
        ))}
        <View style={styles.legendItem}>
          <View style={[styles.legendSwatch, { width: 3, backgroundColor: colors.ink }]} />
          <Text variant="caption" color="inkMuted">
            Due (end of day, UTC; at the left edge when already past)
          </Text>
        </View>
      </View>
    </View>
  );
}

function QueueRow({ item, index, controls, testID }: { item: QueueItemView; index: number | null; controls?: React.ReactNode; testID?: string }) {
  const lab = useLab();
  const wide = useIsWide();
  const times: Array<[string, string, string]> = [
    ['Start', item.startAt, 'start'],
    ['Print ends', item.printEndAt, 'print-end'],
    ['Leaves machine', item.leavesMachineAt, 'leaves'],
    ['Cooled', item.cooledAt, 'cooled'],
    ['Parts out', item.breakoutDoneAt, 'out'],
  ];
  return (
    <View style={[styles.row, item.late && styles.rowLate]} testID={testID}>
      <View style={styles.rowHead}>
        {index !== null ? (
          <Text variant="title" color="inkFaint" style={{ minWidth: 32 }}>
            {index + 1}
          </Text>
        ) : null}
        <View style={{ flex: 1, gap: spacing.xxs, minWidth: 180 }}>
          <LinkPressable href={`/plans/${item.planId}`} accessibilityLabel={`Open plan ${item.name}`}>
            <Text variant="heading" testID={testID ? `${testID}-name` : undefined}>
              {item.name}
            </Text>
          </LinkPressable>
          <Text variant="bodyStrong" color="teal" testID={testID ? `${testID}-material` : undefined}>
            {item.material.name}
          </Text>
          <Text variant="caption" color="inkMuted">
            {STATUS_LABELS[item.status]} · chamber {item.chamberIndex + 1}
            {item.requests.length ? ` · ${item.requests.map((r) => `${r.title} (due ${formatDate(r.dueDate)})`).join(', ')}` : ''}
          </Text>
        </View>
        {item.late ? (
          <Badge label={`Late by ${item.lateByHours < 24 ? `${Math.ceil(item.lateByHours)} h` : `${(item.lateByHours / 24).toFixed(1)} days`}`} tone="danger" testID={testID ? `${testID}-late` : undefined} />
        ) : item.earliestDueDate ? (
          <Badge label="In time" tone="teal" testID={testID ? `${testID}-ontime` : undefined} />
        ) : null}
        {controls}
      </View>
      {item.materialChange ? (
        <Notice tone="caution" title="Material changes" testID={testID ? `${testID}-material-change` : undefined}>
          {`${item.material.name} after ${item.materialChange.previousMaterial.name} ("${item.materialChange.previousPlanName}") on this machine: ` +
            "empty, clean and refill the feed and overflow before this build, as the machine maker's instructions say, so the powders do not mix."}
        </Notice>
      ) : null}
      <View style={[styles.times, wide && styles.timesWide]}>
        {times.map(([label, iso, key]) => (
          <View key={key} style={styles.time}>
            <Text variant="overline" color="inkMuted">
              {label}
            </Text>
            <Text variant="figure" testID={testID ? `${testID}-${key}` : undefined}>
              {formatMoment(iso)}
            </Text>
          </View>
        ))}
        <View style={styles.time}>
          <Text variant="overline" color={item.late ? 'danger' : 'inkMuted'}>
            Due
          </Text>
          <Text variant="figure" color={item.late ? 'danger' : 'ink'} testID={testID ? `${testID}-due` : undefined}>
            {item.earliestDueDate ? formatDate(item.earliestDueDate) : '–'}
          </Text>
        </View>
      </View>
      {wide ? <BuildFileLinks labId={lab.id} planId={item.planId} testID={testID ? `${testID}-files` : undefined} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  tabs: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  tab: { minHeight: 48, paddingHorizontal: spacing.lg, justifyContent: 'center', borderRadius: radius.pill, borderWidth: 1, borderColor: colors.lineStrong, backgroundColor: colors.surface },
  tabOn: { backgroundColor: colors.ember, borderColor: colors.ember },
  summary: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.md },
  timeline: { gap: spacing.xs, padding: spacing.md, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line, backgroundColor: colors.surface },
  lane: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  laneLabel: { width: LABEL_WIDTH },
  laneNarrow: { gap: 2 },
  laneTrack: { flexGrow: 1, flexShrink: 1, height: 18, borderRadius: 4, backgroundColor: colors.powderDeep, overflow: 'hidden' },
  segment: { position: 'absolute', top: 0, bottom: 0 },
  due: { position: 'absolute', top: 0, bottom: 0, width: 3, backgroundColor: colors.ink },
  axisTrack: { height: 30, position: 'relative', marginRight: 36 },
  tick: { position: 'absolute', top: 0, width: 96, alignItems: 'flex-start' },
  tickMark: { width: 1, height: 6, backgroundColor: colors.lineStrong },
  tickMarkDay: { width: 2, height: 8, backgroundColor: colors.ink },
  tickLabel: { fontSize: 11, lineHeight: 14, marginLeft: -2 },
  now: { position: 'absolute', top: 0, bottom: 0, width: 4, marginLeft: -2, backgroundColor: colors.danger, borderLeftWidth: 1, borderRightWidth: 1, borderColor: colors.surface },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md, marginTop: spacing.xs },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  legendSwatch: { width: 12, height: 12, borderRadius: 2 },
  row: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line, backgroundColor: colors.surface },
  rowLate: { borderColor: colors.danger, borderLeftWidth: 5 },
  rowHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.md },
  arrows: { flexDirection: 'row', gap: spacing.xs },
  times: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.sm, columnGap: spacing.lg },
  timesWide: { columnGap: spacing.xl },
  time: { minWidth: 96, gap: 2 },
});
