import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useAdvanceRunMutation, useRunQuery } from '../queries/runs';
import { BuildFileLinks } from '../review/BuildFileLinks';
import { colors, radius, spacing } from '../theme';
import { ErrorState, LoadingState, Notice, Text } from '../ui';
import { enoughPowder, printTimer } from '../../shared/floor';
import { STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import type { RunView } from '../../shared/schemas/runs';
import { BreakoutStage, DoneStage, FinishingStage } from './AfterPrintStages';
import { CoolingStage } from './CoolingStage';
import { PowderBeforeStart, usePowderLoad } from './PowderSection';
import { CheckRow, FloorButton, FloorInput } from './controls';
import { clockOffsetMs, formatClock, formatDuration, useNow } from './live';
import { Big, CalibrationLine, ConfirmButton, fieldError, kgText, parseNumber, Progress, StageFoot, stageStyles, stepError, type StageProps } from './stageKit';

const STAGES: Array<{ status: PlanStatus; label: string }> = [
  { status: 'queued', label: 'Before printing' },
  { status: 'printing', label: 'Printing' },
  { status: 'cooling', label: 'Cooling' },
  { status: 'breakout', label: 'Breakout' },
  { status: 'finishing', label: 'Finishing' },
];

/** One run at the machine as a single card: where it is, what to do, what to watch out for, and the button that moves it on. */
export function RunCard({ planId }: { planId: string }) {
  const lab = useLab();
  const run = useRunQuery(lab.id, planId);
  if (run.isPending) return <LoadingState label="Loading the run…" />;
  if (run.isError && !run.data) return <ErrorState error={run.error} onRetry={() => run.refetch()} />;
  const data = run.data as RunView;
  return <RunCardBody key={`${data.planId}:${data.status}`} run={data} offsetMs={clockOffsetMs(data.now, run.dataUpdatedAt)} stale={run.isError} />;
}

function RunCardBody({ run, offsetMs, stale }: { run: RunView; offsetMs: number; stale: boolean }) {
  const lab = useLab();
  const advance = useAdvanceRunMutation(lab.id, run.planId);
  const err = stepError(advance.error);
  const stageIndex = run.status === 'done' ? STAGES.length : STAGES.findIndex((s) => s.status === run.status);
  const canAct = lab.has('operator') || lab.has('lead');

  return (
    <View style={styles.card} testID={`run-card-${run.planId}`} accessibilityLabel={`${run.planName}: ${STATUS_LABELS[run.status]}`}>
      <View style={styles.head}>
        <Text variant="overline" color="onGraphiteMuted" testID="run-machine-material">
          {run.machine.name} · {run.material.name}
        </Text>
        <Text variant="title" color="onGraphite" testID="run-plan-name">
          {run.planName}
        </Text>
        <View style={styles.strip} accessibilityRole="progressbar" accessibilityLabel={`Stage: ${STATUS_LABELS[run.status]}`}>
          {STAGES.map((s, i) => (
            <View key={s.status} style={[styles.stripCell, i < stageIndex && styles.stripDone, i === stageIndex && styles.stripNow]} />
          ))}
        </View>
        <Text variant="heading" color="onGraphite" testID="run-stage" style={{ fontSize: 20 }}>
          {stageIndex >= 0 && stageIndex < STAGES.length ? `${stageIndex + 1} of ${STAGES.length} · ${STAGES[stageIndex].label}` : STATUS_LABELS[run.status]}
        </Text>
      </View>
      <View style={styles.body}>
        {run.card.instruction ? (
          <Text variant="body" style={styles.instruction} testID="run-instruction">
            {run.card.instruction}
          </Text>
        ) : null}
        {stale ? <Notice tone="caution">The server cannot be reached: this card may be out of date.</Notice> : null}
        {!canAct ? <Notice tone="info">Only operators and leads move a run on; you can follow it here.</Notice> : null}
        <Stage run={run} offsetMs={offsetMs} advance={advance} err={err} canAct={canAct} />
      </View>
    </View>
  );
}

function Stage(p: StageProps) {
  switch (p.run.status) {
    case 'queued':
      return <BeforePrinting {...p} />;
    case 'printing':
      return <Printing {...p} />;
    case 'cooling':
      return <CoolingStage {...p} />;
    case 'breakout':
      return <BreakoutStage {...p} />;
    case 'finishing':
      return <FinishingStage {...p} />;
    case 'done':
      return <DoneStage run={p.run} />;
    case 'aborted':
      return (
        <Notice tone="danger" title="Aborted" testID="run-aborted">
          {`${p.run.abortReason ?? 'No reason recorded.'} Its parts are open in their requests again.`}
        </Notice>
      );
    default:
      return <Text color="inkMuted">This plan is {STATUS_LABELS[p.run.status].toLowerCase()}: it is not at the machine.</Text>;
  }
}

function BeforePrinting({ run, advance, err, canAct }: StageProps) {
  const lab = useLab();
  const [checks, setChecks] = useState({ chamberInPlace: false, opticalWindowClean: false });
  const [fresh, setFresh] = useState('');
  const [reused, setReused] = useState('');
  const needFresh = run.estimate?.freshPowderKg ?? 0;
  const needReused = run.estimate?.reusedPowderKg ?? 0;
  const freshKg = parseNumber(fresh);
  const reusedKg = parseNumber(reused);
  const blockers: string[] = [];
  if (!checks.chamberInPlace) blockers.push('confirm the build chamber is in place');
  if (!checks.opticalWindowClean) blockers.push('confirm the optical window is clean');
  if (!Number.isFinite(freshKg)) blockers.push('enter the fresh powder loaded');
  else if (!enoughPowder(freshKg, needFresh)) blockers.push(`load ${kgText(needFresh - freshKg)} more fresh powder`);
  if (!Number.isFinite(reusedKg)) blockers.push('enter the reused powder loaded');
  else if (!enoughPowder(reusedKg, needReused)) blockers.push(`load ${kgText(needReused - reusedKg)} more reused powder`);
  if (!run.estimate) blockers.push('the plan needs a chosen layout');
  const powder = usePowderLoad(run.planId, freshKg, reusedKg);
  if (powder.check.problems.length > 0) blockers.push(`the stock of ${run.material.name} does not cover this load (see Powder above)`);

  return (
    <View style={stageStyles.stage} testID="stage-queued">
      <View style={stageStyles.figures}>
        <Big label="Fresh powder needed" value={kgText(needFresh)} testID="need-fresh" />
        <Big label="Reused powder needed" value={kgText(needReused)} testID="need-reused" />
        <Big label="Print, estimated" value={run.estimate ? formatDuration(run.estimate.printSeconds) : '–'} />
      </View>
      <CalibrationLine machineId={run.machine.id} />
      <PowderBeforeStart load={powder} canAct={canAct} onUse={(f, r) => { setFresh(String(f)); setReused(String(r)); }} />
      <CheckRow label="The build chamber is in place" checked={checks.chamberInPlace} onToggle={() => setChecks((c) => ({ ...c, chamberInPlace: !c.chamberInPlace }))} testID="check-chamberInPlace" />
      <CheckRow label="The optical window is clean" checked={checks.opticalWindowClean} onToggle={() => setChecks((c) => ({ ...c, opticalWindowClean: !c.opticalWindowClean }))} testID="check-opticalWindowClean" />
      <FloorInput
        label="Fresh powder in the hopper"
        unit="kg"
        value={fresh}
        onChangeText={setFresh}
        hint={`At least ${kgText(needFresh)}`}
        error={fieldError(err, 'freshPowderKg') ?? (Number.isFinite(freshKg) && !enoughPowder(freshKg, needFresh) ? `Too little: the build needs at least ${kgText(needFresh)}.` : null)}
        testID="load-fresh"
      />
      <FloorInput
        label="Reused powder in the hopper"
        unit="kg"
        value={reused}
        onChangeText={setReused}
        hint={`At least ${kgText(needReused)}`}
        error={fieldError(err, 'reusedPowderKg') ?? (Number.isFinite(reusedKg) && !enoughPowder(reusedKg, needReused) ? `Too little: the build needs at least ${kgText(needReused)}.` : null)}
        testID="load-reused"
      />
      <BuildFileLinks labId={lab.id} planId={run.planId} testID="run-files" />
      <StageFoot run={run} err={err} fieldsShown={['freshPowderKg', 'reusedPowderKg']}>
        {blockers.length > 0 ? (
          <Text variant="label" color="inkMuted" testID="start-blocked">
            To start: {blockers.join('; ')}.
          </Text>
        ) : null}
        <ConfirmButton
          label="Start the build"
          disabled={!canAct || blockers.length > 0}
          loading={advance.isPending}
          question={`Start "${run.planName}" on ${run.machine.name} in ${run.material.name}?`}
          detail="The laser and heaters start; a started build can only be finished or aborted."
          confirmLabel={`Start "${run.planName}"`}
          onConfirm={() => advance.mutate({ to: 'printing', checklist: { chamberInPlace: true, opticalWindowClean: true }, freshPowderKg: freshKg, reusedPowderKg: reusedKg, ...(powder.lots ? { lots: powder.lots } : {}) })}
          testID="run-start"
        />
      </StageFoot>
    </View>
  );
}

function Printing({ run, offsetMs, advance, err, canAct }: StageProps) {
  const now = useNow() + offsetMs;
  const [aborting, setAborting] = useState(false);
  const [reason, setReason] = useState('');
  const timer =
    run.startedAt && run.estimate
      ? printTimer({ startedAtMs: Date.parse(run.startedAt), nowMs: now, preheatSeconds: run.estimate.preheatSeconds, printSeconds: run.estimate.printSeconds })
      : null;
  return (
    <View style={stageStyles.stage} testID="stage-printing">
      {timer ? (
        <>
          <View style={stageStyles.figures}>
            <Big label="Elapsed" value={formatDuration(timer.elapsedSeconds)} testID="print-elapsed" />
            <Big label="Remaining" value={formatDuration(timer.remainingSeconds)} testID="print-remaining" />
            <Big label="Expected end" value={formatClock(timer.expectedEndMs, now)} testID="print-end" />
          </View>
          <Progress fraction={timer.fraction} />
          <Text variant="label" color={timer.phase === 'overdue' ? 'amber' : 'inkMuted'}>
            {timer.phase === 'preheat' ? 'Preheating the bed.' : timer.phase === 'layers' ? 'Printing layers.' : 'Past the estimate: record the end when the last layer is done.'}
            {run.startedBy ? ` Started by ${run.startedBy.name} at ${formatClock(Date.parse(run.startedAt!), now)}.` : ''}
          </Text>
        </>
      ) : (
        <Text color="inkMuted">No estimate to time this print against.</Text>
      )}
      <CalibrationLine machineId={run.machine.id} />
      <StageFoot run={run} err={err} fieldsShown={aborting ? ['reason'] : []}>
        {aborting ? (
          <View style={styles.abort} testID="abort-form">
            <FloorInput label="Why is the build stopped?" value={reason} onChangeText={setReason} keyboard="default" multiline error={fieldError(err, 'reason')} testID="abort-reason" />
            <Text variant="bodyStrong" color="danger" testID="abort-question">
              {`Abort "${run.planName}"? This stops the print for good; its parts go back to their requests.`}
            </Text>
            <FloorButton
              label={`Abort "${run.planName}"`}
              tone="danger"
              disabled={!canAct || reason.trim() === ''}
              loading={advance.isPending && advance.variables?.to === 'aborted'}
              onPress={() => advance.mutate({ to: 'aborted', runId: run.id, reason: reason.trim() })}
              testID="abort-confirm"
            />
            <FloorButton label="Keep printing" tone="secondary" onPress={() => setAborting(false)} testID="abort-cancel" />
          </View>
        ) : (
          <FloorButton label="Abort…" tone="danger" disabled={!canAct} onPress={() => setAborting(true)} testID="run-abort" />
        )}
        <ConfirmButton
          label="Print finished: start cooling"
          disabled={!canAct || aborting}
          loading={advance.isPending && advance.variables?.to === 'cooling'}
          question={`Record the end of the print of "${run.planName}"?`}
          detail={
            timer && timer.remainingSeconds > 60
              ? `The estimate has ${formatDuration(timer.remainingSeconds)} still to go: only record the end if the last layer is really done. This cannot be undone.`
              : 'Cooling starts now. This cannot be undone.'
          }
          early={!!timer && timer.remainingSeconds > 60}
          confirmLabel={`End the print of "${run.planName}"`}
          onConfirm={() => advance.mutate({ to: 'cooling', runId: run.id })}
          testID="run-print-done"
        />
      </StageFoot>
    </View>
  );
}
const styles = StyleSheet.create({
  card: { borderRadius: radius.lg, overflow: 'hidden', backgroundColor: colors.surface, borderWidth: 1, borderColor: colors.line },
  head: { backgroundColor: colors.graphite, padding: spacing.lg, gap: spacing.sm },
  strip: { flexDirection: 'row', gap: spacing.xs },
  stripCell: { flex: 1, height: 6, borderRadius: 3, backgroundColor: colors.graphiteRaised },
  stripDone: { backgroundColor: colors.teal },
  stripNow: { backgroundColor: colors.ember },
  body: { padding: spacing.lg, gap: spacing.lg },
  instruction: { fontSize: 17, lineHeight: 24 },
  abort: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.dangerSoft },
});
