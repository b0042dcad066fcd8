import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { useAcceptReadingMutation, useAddReadingMutation, useAdvanceRunMutation, useCalibrationQuery, useRunQuery } from '../queries/runs';
import { calibrationNote } from '../review/calibration';
import { BuildFileLinks } from '../review/BuildFileLinks';
import { colors, radius, spacing } from '../theme';
import { ErrorState, Figure, LoadingState, Notice, Text } from '../ui';
import { enoughPowder, printTimer } from '../../shared/floor';
import { STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import type { RunView } from '../../shared/schemas/runs';
import { Cautions } from './Cautions';
import { PowderBeforeStart, PowderRecovery, usePowderLoad } from './PowderSection';
import { CheckRow, CountStepper, FloorButton, FloorInput } from './controls';
import { clockOffsetMs, formatClock, formatDuration, liveCooling, useNow } from './live';

const STAGES: Array<{ status: PlanStatus; label: string }> = [
  { status: 'queued', label: 'Before printing' },
  { status: 'printing', label: 'Printing' },
  { status: 'cooling', label: 'Cooling' },
  { status: 'breakout', label: 'Breakout' },
  { status: 'finishing', label: 'Finishing' },
];

const kgText = (kg: number) => `${(Math.ceil(kg * 10) / 10).toFixed(1)} kg`;
const parseNumber = (t: string) => (t.trim() === '' ? Number.NaN : Number(t.replace(',', '.')));

type StepError = { message: string; field?: string; conflict: boolean } | null;
/** The server names the field first ("tempC must be ..."); beside the field itself the name is noise. */
function plainMessage(message: string, field: string | undefined): string {
  const rest = field && message.startsWith(`${field} `) ? message.slice(field.length + 1) : message;
  return rest ? rest[0].toUpperCase() + rest.slice(1) : message;
}

function stepError(e: unknown): StepError {
  if (!e) return null;
  if (isApiError(e)) return { message: plainMessage(e.message, e.field), field: e.field, conflict: e.status === 409 };
  return { message: e instanceof Error ? e.message : String(e), conflict: false };
}

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

type Advance = ReturnType<typeof useAdvanceRunMutation>;
type StageProps = { run: RunView; offsetMs: number; advance: Advance; err: StepError; canAct: boolean };

function Stage(p: StageProps) {
  switch (p.run.status) {
    case 'queued':
      return <BeforePrinting {...p} />;
    case 'printing':
      return <Printing {...p} />;
    case 'cooling':
      return <Cooling {...p} />;
    case 'breakout':
      return <Breakout {...p} />;
    case 'finishing':
      return <Finishing {...p} />;
    case 'done':
      return <Done run={p.run} />;
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

/** The end of every stage: its cautions, the server's answer when a step is refused, then the main button within thumb's reach. */
function StageFoot({ run, err, fieldsShown = [], children }: { run: RunView; err: StepError; fieldsShown?: string[]; children: React.ReactNode }) {
  const shownInline = err?.field && fieldsShown.some((f) => err.field === f || err.field!.startsWith(`${f}[`) || err.field!.startsWith(`${f}.`));
  return (
    <>
      <Cautions cautions={run.card.cautions} deferral={run.card.deferral} />
      {err && !shownInline ? (
        <Notice tone="danger" title={err.conflict ? 'The run is not where this phone thought' : 'Not recorded'} testID="run-error">
          {err.message + (err.conflict ? ' The card now shows the run as it is.' : '')}
        </Notice>
      ) : null}
      <View style={styles.actions}>{children}</View>
    </>
  );
}

function fieldError(err: StepError, field: string): string | null {
  if (!err?.field) return null;
  return err.field === field ? err.message : null;
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
    <View style={styles.stage} testID="stage-queued">
      <View style={styles.figures}>
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
    <View style={styles.stage} testID="stage-printing">
      {timer ? (
        <>
          <View style={styles.figures}>
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

function Cooling({ run, offsetMs, advance, err, canAct }: StageProps) {
  const lab = useLab();
  const now = useNow() + offsetMs;
  const addReading = useAddReadingMutation(lab.id, run.planId);
  const [temp, setTemp] = useState('');
  const timer = run.timers.cooling;
  const live = timer ? liveCooling(timer, now) : null;
  const [where, setWhere] = useState<'machine' | 'outside'>(live && live.removalReached ? 'outside' : 'machine');
  const t = run.thresholds;
  const readingErr = stepError(addReading.error);
  const tempC = parseNumber(temp);
  const latest = [...run.readings].slice(-4).reverse();
  return (
    <View style={styles.stage} testID="stage-cooling">
      {live ? (
        <>
          <View style={styles.figures}>
            <Big label="Cake now, about" value={`${Math.round(live.predictedTempC)} °C`} testID="cool-temp" />
            <Big
              label={`To removal, ${t.removalTempC} °C`}
              value={live.removalReached ? 'Reached' : formatDuration(live.remainingToRemovalSeconds)}
              testID="cool-removal"
              tone={live.removalReached ? 'teal' : undefined}
            />
            <Big
              label={`To handling, ${t.handlingTempC} °C`}
              value={live.handlingReached ? 'Reached' : formatDuration(live.remainingToHandlingSeconds)}
              testID="cool-handling"
              tone={live.handlingReached ? 'teal' : undefined}
            />
          </View>
          <Text variant="label" color="inkMuted" testID="cool-phase">
            {live.phase === 'in_machine'
              ? `In the machine until ${t.removalTempC} °C (about ${formatClock(timer!.removalAtMs, now)}); then the chamber may leave it.`
              : live.phase === 'outside'
                ? `Outside the machine until ${t.handlingTempC} °C (about ${formatClock(timer!.handlingAtMs, now)}).`
                : 'Cool enough to handle: breakout may start.'}
            {timer!.fitted
              ? ` The timer follows the core temperature of the cake, at the pace your ${timer!.readingsUsed === 1 ? 'reading shows' : `${timer!.readingsUsed} readings show`}.`
              : ' The timer follows the core temperature of the cake by heat conduction, as the estimate does; readings set its pace.'}
          </Text>
        </>
      ) : (
        <Text color="inkMuted">No cooling estimate: enter readings and start breakout once a reading is at or below {t.handlingTempC} °C.</Text>
      )}
      <View style={styles.reading} testID="reading-form">
        <Text variant="heading">Enter a reading</Text>
        <View style={styles.segment}>
          {(['machine', 'outside'] as const).map((w) => (
            <View key={w} style={{ flex: 1, minWidth: 140 }}>
              <CheckRow label={w === 'machine' ? 'In the machine' : 'Outside'} checked={where === w} onToggle={() => setWhere(w)} testID={`reading-where-${w}`} />
            </View>
          ))}
        </View>
        <FloorInput label="Temperature" unit="°C" value={temp}
          onChangeText={(v) => {
            setTemp(v);
            if (addReading.isError) addReading.reset();
          }}
          error={readingErr?.field === 'tempC' ? readingErr.message : null} hint="Reading outside marks the chamber as out of the machine." testID="reading-temp" />
        {readingErr && readingErr.field !== 'tempC' ? (
          <Notice tone="danger" title="Reading not recorded" testID="reading-error">
            {readingErr.message}
          </Notice>
        ) : null}
        <FloorButton
          label="Record reading"
          tone="secondary"
          disabled={!canAct || !Number.isFinite(tempC)}
          loading={addReading.isPending}
          onPress={() => addReading.mutate({ tempC, where, runId: run.id! }, { onSuccess: () => setTemp('') })}
          testID="reading-submit"
        />
        {latest.length > 0 ? (
          <View testID="reading-list" style={{ gap: spacing.sm }}>
            {latest.map((r) => (
              <ReadingRow key={r.id} run={run} reading={r} now={now} canAccept={lab.isLead} />
            ))}
          </View>
        ) : null}
      </View>
      <StageFoot run={run} err={err}>
        {live && !live.handlingReached ? (
          <Text variant="label" color="inkMuted" testID="breakout-locked">
            Breakout unlocks when the timer reaches {t.handlingTempC} °C, or when you record a reading at or below it.
          </Text>
        ) : null}
        <ConfirmButton
          label="Start breakout"
          disabled={!canAct || (live ? !live.handlingReached : !run.readings.some((r) => r.check.status !== 'unexplained' && r.tempC <= t.handlingTempC))}
          loading={advance.isPending}
          question={`Start breaking out "${run.planName}"?`}
          detail={`Cooling ends; wear heat-resistant gloves and check the cake's core is at or below ${t.handlingTempC} °C. This cannot be undone.`}
          confirmLabel={`Break out "${run.planName}"`}
          onConfirm={() => advance.mutate({ to: 'breakout', runId: run.id })}
          testID="run-breakout"
        />
      </StageFoot>
    </View>
  );
}

type Reading = RunView['readings'][number];

/**
 * One reading with what the cooling model made of it. A reading colder than the cake can be by then counts for
 * nothing until a second reading agrees or a lead accepts it: the lead's button asks for the reason and names the
 * build and the reading before it is recorded.
 */
function ReadingRow({ run, reading: r, now, canAccept }: { run: RunView; reading: Reading; now: number; canAccept: boolean }) {
  const lab = useLab();
  const accept = useAcceptReadingMutation(lab.id, run.planId);
  const [open, setOpen] = useState(false);
  const [reason, setReason] = useState('');
  const acceptErr = stepError(accept.error);
  const line = `${formatClock(Date.parse(r.at), now)} · ${r.tempC} °C ${r.where === 'machine' ? 'in the machine' : 'outside'}${r.by ? ` · ${r.by.name}` : ''}`;
  if (r.check.status !== 'unexplained') {
    const note =
      r.check.status === 'confirmed'
        ? ' · confirmed by a second reading'
        : r.check.status === 'accepted' && r.check.accepted
          ? ` · accepted by ${r.check.accepted.by.name}: ${r.check.accepted.reason}`
          : '';
    return (
      <Text variant="label" color="inkMuted" testID={`reading-${r.id}`}>
        {line}
        {note}
      </Text>
    );
  }
  return (
    <View style={styles.doubted} testID={`reading-${r.id}`}>
      <Text variant="label" color="ink">
        {line}
      </Text>
      <Text variant="label" color="danger" testID={`reading-${r.id}-doubt`}>
        {`Colder than the cake can be by then (its core is at least ${Math.round(r.check.coolestC ?? 0)} °C by the cooling model), so it does not count yet. ` +
          `Take a second reading at least 10 minutes after it${canAccept ? ', or accept it with a reason' : ', or ask a lead to accept it'}.`}
      </Text>
      {canAccept && !open ? <FloorButton label="Accept this reading…" tone="secondary" onPress={() => setOpen(true)} testID={`reading-${r.id}-accept`} /> : null}
      {canAccept && open ? (
        <View style={styles.acceptForm} testID={`reading-${r.id}-accept-form`}>
          <FloorInput label="Why is this reading right?" value={reason} onChangeText={setReason} keyboard="default" multiline error={acceptErr?.field === 'reason' ? acceptErr.message : null} testID={`reading-${r.id}-reason`} />
          <Text variant="bodyStrong" testID={`reading-${r.id}-question`}>
            {`Accept ${r.tempC} °C for "${run.planName}"? It then counts like any other reading and may unlock breakout; your name and reason are kept with it.`}
          </Text>
          {acceptErr && acceptErr.field !== 'reason' ? (
            <Notice tone="danger" title="Not accepted">
              {acceptErr.message}
            </Notice>
          ) : null}
          <FloorButton
            label={`Accept ${r.tempC} °C`}
            disabled={reason.trim().length < 3}
            loading={accept.isPending}
            onPress={() => accept.mutate({ readingId: r.id, runId: run.id!, reason: reason.trim() }, { onSuccess: () => setOpen(false) })}
            testID={`reading-${r.id}-accept-confirm`}
          />
          <FloorButton label="Not now" tone="secondary" onPress={() => setOpen(false)} testID={`reading-${r.id}-accept-cancel`} />
        </View>
      ) : null}
    </View>
  );
}

function Breakout({ run, advance, err, canAct }: StageProps) {
  const [counts, setCounts] = useState(() => Object.fromEntries(run.lines.map((l) => [l.requestLineId, { good: l.plannedCount, failed: 0 }])));
  const over = run.lines.filter((l) => counts[l.requestLineId].good + counts[l.requestLineId].failed > l.plannedCount);
  const errorFor = (i: number) => (err?.field && (err.field === `counts[${i}]` || err.field.startsWith(`counts[${i}].`)) ? err.message : null);
  return (
    <View style={styles.stage} testID="stage-breakout">
      {run.lines.map((l, i) => {
        const c = counts[l.requestLineId];
        const set = (patch: Partial<typeof c>) => setCounts((all) => ({ ...all, [l.requestLineId]: { ...all[l.requestLineId], ...patch } }));
        const tooMany = c.good + c.failed > l.plannedCount;
        return (
          <View key={l.requestLineId} style={styles.countLine} testID={`count-line-${i}`}>
            <Text variant="heading">
              {l.part.name} <Text variant="body" color="inkMuted">· {l.request.title} · {l.plannedCount} in the build</Text>
            </Text>
            <CountStepper label="Good" value={c.good} max={l.plannedCount} onChange={(n) => set({ good: n })} testID={`count-good-${i}`} />
            <CountStepper label="Failed" value={c.failed} max={l.plannedCount} onChange={(n) => set({ failed: n })} testID={`count-failed-${i}`} />
            {tooMany || errorFor(i) ? (
              <Text variant="label" color="danger" accessibilityRole="alert">
                {errorFor(i) ?? `Good and failed add up to ${c.good + c.failed}, but the build held ${l.plannedCount}.`}
              </Text>
            ) : c.good + c.failed < l.plannedCount ? (
              <Text variant="label" color="inkMuted">
                {l.plannedCount - c.good - c.failed} not accounted for: they go back to the request as open with the failed ones.
              </Text>
            ) : null}
          </View>
        );
      })}
      <PowderRecovery planId={run.planId} canAct={canAct} />
      <StageFoot run={run} err={err} fieldsShown={['counts']}>
        <ConfirmButton
          label="Record counts: start finishing"
          disabled={!canAct || over.length > 0}
          loading={advance.isPending}
          question={`Record these counts for "${run.planName}"?`}
          detail={`${run.lines.reduce((n, l) => n + counts[l.requestLineId].good, 0)} good, ${run.lines.reduce((n, l) => n + counts[l.requestLineId].failed, 0)} failed. Parts not counted good go back to their requests to be planned again; the counts cannot be changed afterwards.`}
          confirmLabel={`Record the counts of "${run.planName}"`}
          onConfirm={() => advance.mutate({ to: 'finishing', runId: run.id, counts: run.lines.map((l) => ({ requestLineId: l.requestLineId, ...counts[l.requestLineId] })) })}
          testID="run-counts"
        />
      </StageFoot>
    </View>
  );
}

function Finishing({ run, advance, err, canAct }: StageProps) {
  const [checks, setChecks] = useState({ powderRemoved: false, blasted: false, inspected: false });
  const [powder, setPowder] = useState('');
  const items = run.card.checklist.filter((c) => c.kind === 'confirm');
  const all = checks.powderRemoved && checks.blasted && checks.inspected;
  const powderKg = parseNumber(powder);
  const good = run.lines.reduce((s, l) => s + (l.goodCount ?? 0), 0);
  return (
    <View style={styles.stage} testID="stage-finishing">
      <Text variant="label" color="inkMuted">
        {good} good part{good === 1 ? '' : 's'} recorded at breakout.
      </Text>
      {items.map((c) => (
        <CheckRow key={c.id} label={c.label} checked={checks[c.id as keyof typeof checks]} onToggle={() => setChecks((x) => ({ ...x, [c.id]: !x[c.id as keyof typeof x] }))} testID={`check-${c.id}`} />
      ))}
      <FloorInput
        label="Powder used (optional)"
        unit="kg"
        value={powder}
        onChangeText={setPowder}
        hint={`Left empty: the estimate's fresh powder, ${kgText(run.estimate?.freshPowderKg ?? 0)}.`}
        error={fieldError(err, 'powderUsedKg')}
        testID="powder-used"
      />
      <StageFoot run={run} err={err} fieldsShown={['powderUsedKg']}>
        <ConfirmButton
          label="Done"
          disabled={!canAct || !all || (powder.trim() !== '' && !Number.isFinite(powderKg))}
          loading={advance.isPending}
          question={`Mark "${run.planName}" done?`}
          detail="The good parts count as printed in their requests and the run's hours go to the machine's calibration. This cannot be undone."
          confirmLabel={`"${run.planName}" is done`}
          onConfirm={() =>
            advance.mutate({
              to: 'done',
              runId: run.id,
              finishingChecklist: { powderRemoved: true, blasted: true, inspected: true },
              ...(Number.isFinite(powderKg) ? { powderUsedKg: powderKg } : {}),
            })
          }
          testID="run-done"
        />
      </StageFoot>
    </View>
  );
}

function Done({ run }: { run: RunView }) {
  const h = (v: number | null) => (v == null ? '–' : `${v.toFixed(1)} h`);
  return (
    <View style={styles.stage} testID="stage-done">
      <Notice tone="success" title="Build done" testID="run-done-notice">
        The request lines' printed counts are updated, and this run's hours now refine the machine's estimates.
      </Notice>
      <View style={styles.figures}>
        <Big label="Print, actual" value={h(run.actualPrintHours)} />
        <Big label="Print, estimated" value={h(run.estimatedPrintHours)} />
        <Big label="Cooling, actual" value={h(run.actualCoolingHours)} />
        <Big label="Cooling, estimated" value={h(run.estimatedCoolingHours)} />
      </View>
      {run.lines.map((l) => (
        <Text key={l.requestLineId} variant="body">
          {l.part.name} ({l.request.title}): {l.goodCount ?? 0} good, {l.failedCount ?? 0} failed of {l.plannedCount}
        </Text>
      ))}
    </View>
  );
}

/**
 * A step that cannot be undone: the first press asks, naming the build, and only the second moves it.
 * The question stays on the card until answered, so a card that refreshes under a thumb cannot be confirmed blind.
 */
function ConfirmButton({
  label,
  question,
  detail,
  confirmLabel,
  onConfirm,
  disabled,
  loading,
  early,
  testID,
}: {
  label: string;
  question: string;
  detail: string;
  confirmLabel: string;
  onConfirm: () => void;
  disabled?: boolean;
  loading?: boolean;
  early?: boolean;
  testID: string;
}) {
  const [asking, setAsking] = useState(false);
  if (!asking) return <FloorButton label={label} disabled={disabled} loading={loading} onPress={() => setAsking(true)} testID={testID} />;
  return (
    <View style={[styles.confirm, early && styles.confirmEarly]} testID={`${testID}-ask`} accessibilityRole="alert">
      <Text variant="heading">{question}</Text>
      <Text variant="body" color={early ? 'danger' : 'inkMuted'}>
        {detail}
      </Text>
      <FloorButton label={confirmLabel} tone={early ? 'danger' : 'primary'} disabled={disabled} loading={loading} onPress={onConfirm} testID={`${testID}-confirm`} />
      <FloorButton label="Not yet" tone="secondary" onPress={() => setAsking(false)} testID={`${testID}-cancel`} />
    </View>
  );
}

function CalibrationLine({ machineId }: { machineId: string }) {
  const lab = useLab();
  const c = useCalibrationQuery(lab.id, machineId);
  if (!c.data) return null;
  return (
    <Text variant="label" color="inkMuted" testID="run-calibration">
      Estimates: {calibrationNote(c.data)}
    </Text>
  );
}

function Big({ label, value, testID, tone }: { label: string; value: string; testID?: string; tone?: 'teal' }) {
  return (
    <View style={styles.big}>
      <Text variant="label" color="inkMuted">
        {label}
      </Text>
      <Figure variant="figureLarge" testID={testID} color={tone ?? 'ink'} style={{ fontSize: 26, lineHeight: 32 }}>
        {value}
      </Figure>
    </View>
  );
}

function Progress({ fraction }: { fraction: number }) {
  return (
    <View style={styles.track} accessibilityRole="progressbar" accessibilityValue={{ min: 0, max: 100, now: Math.round(fraction * 100) }}>
      <View style={[styles.fill, { width: `${Math.round(Math.min(1, Math.max(0, fraction)) * 100)}%` }]} />
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
  stage: { gap: spacing.lg },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  big: { flexGrow: 1, flexBasis: 140, gap: spacing.xxs },
  actions: { gap: spacing.md },
  confirm: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.powder, borderWidth: 2, borderColor: colors.ember },
  confirmEarly: { backgroundColor: colors.dangerSoft, borderColor: colors.danger },
  abort: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.dangerSoft },
  reading: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.powder },
  segment: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' },
  doubted: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.dangerSoft, borderLeftWidth: 4, borderLeftColor: colors.danger },
  acceptForm: { gap: spacing.md },
  countLine: { gap: spacing.sm, paddingBottom: spacing.md, borderBottomWidth: 1, borderBottomColor: colors.line },
  track: { height: 12, borderRadius: 6, backgroundColor: colors.powderDeep, overflow: 'hidden' },
  fill: { height: 12, backgroundColor: colors.ember },
});
