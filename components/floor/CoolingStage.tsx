import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useAcceptReadingMutation, useAddReadingMutation } from '../queries/runs';
import { colors, radius, spacing } from '../theme';
import { Notice, Text } from '../ui';
import type { RunView } from '../../shared/schemas/runs';
import { FloorButton, FloorInput, RadioRows } from './controls';
import { formatClock, formatDuration, liveCooling, useNow } from './live';
import { Big, ConfirmButton, parseNumber, StageFoot, stageStyles, stepError, type StageProps } from './stageKit';

/** The cooling stage: the cake's predicted core temperature, the readings that correct it, and breakout once it is cool enough. */
export function CoolingStage({ run, offsetMs, advance, err, canAct }: StageProps) {
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
    <View style={stageStyles.stage} testID="stage-cooling">
      {live ? (
        <>
          <View style={stageStyles.figures}>
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
        <RadioRows
          label="Where the chamber is"
          options={[
            { value: 'machine', label: 'In the machine' },
            { value: 'outside', label: 'Outside' },
          ]}
          value={where}
          onChange={setWhere}
          testID="reading-where"
        />
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

const styles = StyleSheet.create({
  reading: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.powder },
  doubted: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.dangerSoft, borderLeftWidth: 4, borderLeftColor: colors.danger },
  acceptForm: { gap: spacing.md },
});
