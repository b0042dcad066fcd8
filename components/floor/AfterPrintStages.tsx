import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, spacing } from '../theme';
import { Notice, Text } from '../ui';
import type { RunView } from '../../shared/schemas/runs';
import { PowderRecovery } from './PowderSection';
import { CheckRow, CountStepper, FloorInput } from './controls';
import { Big, ConfirmButton, fieldError, kgText, parseNumber, StageFoot, stageStyles, type StageProps } from './stageKit';

/** After the print: the counts at breakout (with the powder recovered), the finishing checks, and the run's summary when done. */
export function BreakoutStage({ run, advance, err, canAct }: StageProps) {
  const [counts, setCounts] = useState(() => Object.fromEntries(run.lines.map((l) => [l.requestLineId, { good: l.plannedCount, failed: 0 }])));
  const over = run.lines.filter((l) => counts[l.requestLineId].good + counts[l.requestLineId].failed > l.plannedCount);
  const errorFor = (i: number) => (err?.field && (err.field === `counts[${i}]` || err.field.startsWith(`counts[${i}].`)) ? err.message : null);
  return (
    <View style={stageStyles.stage} testID="stage-breakout">
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

export function FinishingStage({ run, advance, err, canAct }: StageProps) {
  const [checks, setChecks] = useState({ powderRemoved: false, blasted: false, inspected: false });
  const [powder, setPowder] = useState('');
  const items = run.card.checklist.filter((c) => c.kind === 'confirm');
  const all = checks.powderRemoved && checks.blasted && checks.inspected;
  const powderKg = parseNumber(powder);
  const good = run.lines.reduce((s, l) => s + (l.goodCount ?? 0), 0);
  return (
    <View style={stageStyles.stage} testID="stage-finishing">
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

export function DoneStage({ run }: { run: RunView }) {
  const h = (v: number | null) => (v == null ? '–' : `${v.toFixed(1)} h`);
  return (
    <View style={stageStyles.stage} testID="stage-done">
      <Notice tone="success" title="Build done" testID="run-done-notice">
        The request lines' printed counts are updated, and this run's hours now refine the machine's estimates.
      </Notice>
      <View style={stageStyles.figures}>
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

const styles = StyleSheet.create({
  countLine: { gap: spacing.sm, paddingBottom: spacing.md, borderBottomWidth: 1, borderBottomColor: colors.line },
});
