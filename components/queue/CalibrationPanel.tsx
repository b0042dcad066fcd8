import { useMemo, useState } from 'react';
import { Pressable, StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, Line, Rect, Text as SvgText } from 'react-native-svg';
import { useLab } from '../lab/useCurrentLab';
import { useCalibrationChoiceMutation, useCalibrationQuery } from '../queries/runs';
import { colors, fonts, radius, spacing } from '../theme';
import { Badge, Button, Choice, ErrorState, Field, LoadingState, Notice, Text } from '../ui';
import { formatDate } from '../ui/format';
import type { CalibrationRunView, CalibrationView } from '../../shared/schemas/runs';

type Measure = 'print' | 'cooling';

const hours = (h: number | null | undefined) => (h == null ? '–' : h < 10 ? `${h.toFixed(2)} h` : `${h.toFixed(1)} h`);
const ratio = (r: number | null) => (r == null ? '–' : `× ${r.toFixed(2)}`);

/**
 * A machine's estimates against what its runs really took: the factors fitted from them, a chart of actual against
 * estimated hours (one dot a run, the line a perfect estimate would give and the fitted one), and every run with
 * why it counts or not. A lead leaves a run out, or takes one back in, with a reason.
 */
export function CalibrationPanel({ machineId }: { machineId: string }) {
  const lab = useLab();
  const q = useCalibrationQuery(lab.id, machineId);
  const [measure, setMeasure] = useState<Measure>('print');
  const [selected, setSelected] = useState<string | null>(null);
  if (q.isPending) return <LoadingState label="Loading the machine's runs…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const view = q.data as CalibrationView;
  const runs = view.recordedRuns;
  const chosen = runs.find((r) => r.runId === selected) ?? null;
  return (
    <View style={styles.panel} testID="calibration-panel">
      <Text variant="heading">Estimates against the runs</Text>
      <Factors view={view} />
      {runs.length === 0 ? (
        <Text color="inkMuted" testID="calibration-none">
          No finished runs on this machine yet. Each done or aborted run shows here with its actual hours against the estimate.
        </Text>
      ) : (
        <>
          <Choice
            compact
            value={measure}
            onChange={setMeasure}
            options={[
              { value: 'print', label: 'Print time', testID: 'calibration-measure-print' },
              { value: 'cooling', label: 'Cooling time', testID: 'calibration-measure-cooling' },
            ]}
            testID="calibration-measure"
          />
          <RunsChart view={view} measure={measure} selected={selected} onSelect={setSelected} />
          <Readout run={chosen} measure={measure} />
          <View style={{ gap: spacing.sm }} testID="calibration-runs">
            {runs.map((r) => (
              <RunRow key={r.runId} run={r} machineId={machineId} canChoose={lab.isLead} selected={r.runId === selected} onSelect={() => setSelected(r.runId)} />
            ))}
          </View>
        </>
      )}
    </View>
  );
}

function Factors({ view }: { view: CalibrationView }) {
  if (!view.calibrated) {
    return (
      <Text variant="label" color="inkMuted" testID="calibration-factors">
        {`Not calibrated: ${view.runs} run${view.runs === 1 ? '' : 's'} count${view.runs === 1 ? 's' : ''}, 3 are needed. Until then the estimates are the model's own.`}
      </Text>
    );
  }
  const cooling =
    view.coolingFrom === 'readings'
      ? `cooling ÷ ${view.coolingScale.toFixed(2)} from ${view.coolingReadings} core readings`
      : `cooling ÷ ${view.coolingScale.toFixed(2)} from the whole cooling times`;
  const print = view.separate
    ? `layer time × ${view.perLayerScale.toFixed(2)}, scan time × ${view.scanScale.toFixed(2)}`
    : `print time × ${view.printTimeScale.toFixed(2)}`;
  return (
    <Text variant="label" color="inkMuted" testID="calibration-factors">
      {`Fitted from the latest ${view.runs} runs that count: ${print}; ${cooling}.`}
      {view.printTimeClamped || view.coolingClamped ? ' A factor reached the limit of half or twice the model and is held there: check the runs below.' : ''}
    </Text>
  );
}

/** A round step (1, 2 or 5 times a power of ten) near `rough`, for axis ticks a reader can add up. */
function niceStep(rough: number): number {
  const p = 10 ** Math.floor(Math.log10(rough));
  const f = rough / p;
  return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * p;
}
const tickText = (t: number, step: number) => (step < 1 ? t.toFixed(1) : t.toFixed(0));

const CHART_H = 220;
const PAD = { left: 44, right: 12, top: 12, bottom: 34 };

/** Actual against estimated hours, one dot a run: filled when it counts, hollow when it is left out. */
function RunsChart({ view, measure, selected, onSelect }: { view: CalibrationView; measure: Measure; selected: string | null; onSelect: (id: string) => void }) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const points = useMemo(
    () =>
      view.recordedRuns
        .map((r) => ({
          run: r,
          x: measure === 'print' ? r.estimatedPrintHours : r.estimatedCoolingHours,
          y: measure === 'print' ? r.actualPrintHours : r.actualCoolingHours,
        }))
        .filter((p): p is { run: CalibrationRunView; x: number; y: number } => p.y != null && p.x > 0),
    [view, measure],
  );
  // The fitted line: actual = factor x estimate (cooling times are divided by the cooling factor).
  const slope = view.calibrated ? (measure === 'print' ? view.printTimeScale : 1 / view.coolingScale) : 1;
  const step = niceStep(Math.max(1, ...points.flatMap((p) => [p.x, p.y])) / 4);
  const max = Math.ceil((Math.max(1, ...points.flatMap((p) => [p.x, p.y])) * 1.05) / step) * step;
  const plotW = Math.max(0, width - PAD.left - PAD.right);
  const plotH = CHART_H - PAD.top - PAD.bottom;
  const sx = (v: number) => PAD.left + (v / max) * plotW;
  const sy = (v: number) => PAD.top + plotH - (v / max) * plotH;
  const ticks = Array.from({ length: Math.round(max / step) + 1 }, (_, i) => i * step);
  const label = measure === 'print' ? 'print' : 'cooling';
  return (
    <View
      onLayout={onLayout}
      testID="calibration-chart"
      accessibilityLabel={`Actual against estimated ${label} hours of ${points.length} runs; the dashed line is a perfect estimate, the solid one the fitted factor`}
    >
      {width > 0 ? (
        <Svg width={width} height={CHART_H}>
          <Rect x={PAD.left} y={PAD.top} width={plotW} height={plotH} fill={colors.powderDeep} />
          {ticks.map((t) => (
            <SvgText key={`x${t}`} x={sx(t)} y={CHART_H - PAD.bottom + 14} fontSize={11} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="middle">
              {tickText(t, step)}
            </SvgText>
          ))}
          {ticks.map((t) => (
            <SvgText key={`y${t}`} x={PAD.left - 6} y={sy(t) + 3} fontSize={11} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="end">
              {tickText(t, step)}
            </SvgText>
          ))}
          <SvgText x={PAD.left + plotW / 2} y={CHART_H - 4} fontSize={11} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="middle">
            {`Estimated ${label} (h)`}
          </SvgText>
          <SvgText x={10} y={PAD.top + plotH / 2} fontSize={11} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="middle" transform={`rotate(-90 10 ${PAD.top + plotH / 2})`}>
            {`Actual (h)`}
          </SvgText>
          <Line x1={sx(0)} y1={sy(0)} x2={sx(max)} y2={sy(max)} stroke={colors.inkFaint} strokeWidth={1} strokeDasharray="4 4" />
          <Line x1={sx(0)} y1={sy(0)} x2={sx(slope > 1 ? max / slope : max)} y2={sy(slope > 1 ? max : max * slope)} stroke={colors.ember} strokeWidth={2} />
          {points.map((p) => {
            const on = p.run.runId === selected;
            const colour = p.run.counted ? colors.teal : p.run.defaultExclusion === 'aborted' || p.run.defaultExclusion === 'far_outside_model' ? colors.danger : colors.inkFaint;
            return (
              <Circle
                key={p.run.runId}
                cx={sx(p.x)}
                cy={sy(p.y)}
                r={on ? 8 : 6}
                fill={p.run.counted ? colour : colors.surface}
                stroke={on ? colors.ink : colour}
                strokeWidth={on ? 3 : 2}
                onPress={() => onSelect(p.run.runId)}
              />
            );
          })}
        </Svg>
      ) : (
        <View style={{ height: CHART_H }} />
      )}
      <View style={styles.legend}>
        <Legend swatch={<View style={[styles.dot, { backgroundColor: colors.teal }]} />} label="Counts" />
        <Legend swatch={<View style={[styles.dot, { borderColor: colors.danger, borderWidth: 2 }]} />} label="Left out" />
        <Legend swatch={<View style={[styles.bar, { backgroundColor: colors.inkFaint }]} />} label="Estimate right" />
        <Legend swatch={<View style={[styles.bar, { backgroundColor: colors.ember }]} />} label={view.calibrated ? 'Fitted' : 'Fitted (not yet: factor 1)'} />
      </View>
    </View>
  );
}

function Legend({ swatch, label }: { swatch: React.ReactNode; label: string }) {
  return (
    <View style={styles.legendItem}>
      {swatch}
      <Text variant="caption" color="inkMuted">
        {label}
      </Text>
    </View>
  );
}

function Readout({ run, measure }: { run: CalibrationRunView | null; measure: Measure }) {
  return (
    <View style={styles.readout} testID="calibration-readout">
      <Text variant="label" color={run ? 'ink' : 'inkMuted'}>
        {run
          ? measure === 'print'
            ? `${run.planName}: printed ${hours(run.actualPrintHours)} against ${hours(run.estimatedPrintHours)} estimated (${ratio(run.printRatio)}).`
            : `${run.planName}: cooled ${hours(run.actualCoolingHours)} against ${hours(run.estimatedCoolingHours)} estimated (${ratio(run.coolingRatio)})` +
              (run.readingsCoolingScale != null ? `; its ${run.coolingReadings} readings say the cake cools × ${run.readingsCoolingScale.toFixed(2)} the model's pace.` : '.')
          : 'Tap a dot or a run for its figures.'}
      </Text>
    </View>
  );
}

function RunRow({ run, machineId, canChoose, selected, onSelect }: { run: CalibrationRunView; machineId: string; canChoose: boolean; selected: boolean; onSelect: () => void }) {
  const lab = useLab();
  const choose = useCalibrationChoiceMutation(lab.id, machineId);
  const [asking, setAsking] = useState(false);
  const [reason, setReason] = useState('');
  const next: 'exclude' | 'include' = run.counted ? 'exclude' : 'include';
  const cannotCount = run.defaultExclusion === 'aborted' || run.defaultExclusion === 'incomplete';
  const why = run.choice
    ? `${run.choice.choice === 'exclude' ? 'Left out' : 'Taken in'} by ${run.choice.by?.name ?? 'a former member'}: ${run.choice.reason}`
    : run.defaultExclusionText
      ? `Left out by default. ${run.defaultExclusionText}`
      : run.usedInFit
        ? 'Counts toward the factors.'
        : 'Counts, but only the latest 10 runs are fitted.';
  const fieldErr = choose.error && 'field' in choose.error && (choose.error as { field?: string }).field === 'reason' ? choose.error.message : null;
  return (
    <View style={[styles.run, selected && styles.runSelected, !run.counted && styles.runOut]} testID={`calibration-run-${run.runId}`}>
      <Pressable onPress={onSelect} accessibilityRole="button" accessibilityLabel={`Show ${run.planName} on the chart`} style={styles.runHead}>
        <View style={{ flex: 1, minWidth: 180, gap: 2 }}>
          <Text variant="bodyStrong">{run.planName}</Text>
          <Text variant="caption" color="inkMuted">
            {formatDate(run.endedAt)} · {run.materialName ?? 'material unknown'} · {run.outcome === 'aborted' ? `aborted${run.abortReason ? `: ${run.abortReason}` : ''}` : 'done'}
          </Text>
        </View>
        <Badge label={run.counted ? 'Counts' : 'Left out'} tone={run.counted ? 'teal' : run.defaultExclusion && !run.choice ? 'danger' : 'neutral'} testID={`calibration-run-${run.runId}-state`} />
      </Pressable>
      <View style={styles.figures}>
        <Text variant="figure">{`Print ${hours(run.actualPrintHours)} / ${hours(run.estimatedPrintHours)} ${ratio(run.printRatio)}`}</Text>
        <Text variant="figure">{`Cooling ${hours(run.actualCoolingHours)} / ${hours(run.estimatedCoolingHours)} ${ratio(run.coolingRatio)}`}</Text>
        {run.coolingReadings > 0 ? <Text variant="figure">{`${run.coolingReadings} core reading${run.coolingReadings === 1 ? '' : 's'}`}</Text> : null}
      </View>
      <Text variant="caption" color={run.counted ? 'inkMuted' : 'ink'} testID={`calibration-run-${run.runId}-why`}>
        {why}
      </Text>
      {canChoose && !(next === 'include' && cannotCount) ? (
        asking ? (
          <View style={styles.ask} testID={`calibration-run-${run.runId}-ask`}>
            <Field
              label={next === 'exclude' ? 'Why leave it out?' : 'Why should it count?'}
              value={reason}
              onChangeText={setReason}
              multiline
              error={fieldErr}
              testID={`calibration-run-${run.runId}-reason`}
            />
            <Text variant="bodyStrong">
              {next === 'exclude'
                ? `Leave "${run.planName}" out of the machine's calibration? The factors are fitted again without it.`
                : `Count "${run.planName}" in the machine's calibration? The factors are fitted again with it.`}
            </Text>
            {choose.error && !fieldErr ? <Notice tone="danger" title="Not changed">{choose.error.message}</Notice> : null}
            <View style={styles.buttons}>
              <Button
                label={next === 'exclude' ? `Leave "${run.planName}" out` : `Count "${run.planName}"`}
                disabled={reason.trim().length < 3}
                loading={choose.isPending}
                onPress={() => choose.mutate({ runId: run.runId, choice: next, reason: reason.trim() }, { onSuccess: () => { setAsking(false); setReason(''); } })}
                testID={`calibration-run-${run.runId}-confirm`}
              />
              <Button label="Not now" variant="secondary" onPress={() => setAsking(false)} testID={`calibration-run-${run.runId}-cancel`} />
            </View>
          </View>
        ) : (
          <Button
            label={next === 'exclude' ? 'Leave out…' : 'Count it…'}
            variant="secondary"
            size="sm"
            onPress={() => setAsking(true)}
            testID={`calibration-run-${run.runId}-${next}`}
          />
        )
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line, backgroundColor: colors.surface },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md, marginTop: spacing.xs },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  dot: { width: 12, height: 12, borderRadius: 6 },
  bar: { width: 16, height: 3 },
  readout: { padding: spacing.sm, borderRadius: radius.md, backgroundColor: colors.powder },
  run: { gap: spacing.xs, padding: spacing.sm, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line },
  runSelected: { borderColor: colors.ink, borderWidth: 2 },
  runOut: { backgroundColor: colors.powder },
  runHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  figures: { flexDirection: 'row', flexWrap: 'wrap', columnGap: spacing.lg, rowGap: 2 },
  ask: { gap: spacing.sm },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
