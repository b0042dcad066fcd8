/**
 * What every stage of a run card is built from: the server's refusal turned into a line beside its field, the
 * stage's foot (cautions, refusal, main button), the two-press confirmation, and the large figures.
 */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { useCalibrationQuery, type useAdvanceRunMutation } from '../queries/runs';
import { calibrationNote } from '../review/calibration';
import { colors, radius, spacing } from '../theme';
import { Figure, Notice, Text } from '../ui';
import type { RunView } from '../../shared/schemas/runs';
import { Cautions } from './Cautions';
import { FloorButton } from './controls';

export { kgUpText as kgText } from '../../shared/floor/checklist';
export const parseNumber = (t: string) => (t.trim() === '' ? Number.NaN : Number(t.replace(',', '.')));

export type StepError = { message: string; field?: string; conflict: boolean } | null;
/** The server names the field first ("tempC must be ..."); beside the field itself the name is noise. */
function plainMessage(message: string, field: string | undefined): string {
  const rest = field && message.startsWith(`${field} `) ? message.slice(field.length + 1) : message;
  return rest ? rest[0].toUpperCase() + rest.slice(1) : message;
}

export function stepError(e: unknown): StepError {
  if (!e) return null;
  if (isApiError(e)) return { message: plainMessage(e.message, e.field), field: e.field, conflict: e.status === 409 };
  return { message: e instanceof Error ? e.message : String(e), conflict: false };
}

export type Advance = ReturnType<typeof useAdvanceRunMutation>;
export type StageProps = { run: RunView; offsetMs: number; advance: Advance; err: StepError; canAct: boolean };

/** The end of every stage: its cautions, the server's answer when a step is refused, then the main button within thumb's reach. */
export function StageFoot({ run, err, fieldsShown = [], children }: { run: RunView; err: StepError; fieldsShown?: string[]; children: React.ReactNode }) {
  const shownInline = err?.field && fieldsShown.some((f) => err.field === f || err.field!.startsWith(`${f}[`) || err.field!.startsWith(`${f}.`));
  return (
    <>
      <Cautions cautions={run.card.cautions} deferral={run.card.deferral} />
      {err && !shownInline ? (
        <Notice tone="danger" title={err.conflict ? 'The run is not where this phone thought' : 'Not recorded'} testID="run-error">
          {err.message + (err.conflict ? ' The card now shows the run as it is.' : '')}
        </Notice>
      ) : null}
      <View style={stageStyles.actions}>{children}</View>
    </>
  );
}

export function fieldError(err: StepError, field: string): string | null {
  if (!err?.field) return null;
  return err.field === field ? err.message : null;
}

/**
 * A step that cannot be undone: the first press asks, naming the build, and only the second moves it.
 * The question stays on the card until answered, so a card that refreshes under a thumb cannot be confirmed blind.
 */
export function ConfirmButton({
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
    <View style={[stageStyles.confirm, early && stageStyles.confirmEarly]} testID={`${testID}-ask`} accessibilityRole="alert">
      <Text variant="heading">{question}</Text>
      <Text variant="body" color={early ? 'danger' : 'inkMuted'}>
        {detail}
      </Text>
      <FloorButton label={confirmLabel} tone={early ? 'danger' : 'primary'} disabled={disabled} loading={loading} onPress={onConfirm} testID={`${testID}-confirm`} />
      <FloorButton label="Not yet" tone="secondary" onPress={() => setAsking(false)} testID={`${testID}-cancel`} />
    </View>
  );
}

export function CalibrationLine({ machineId }: { machineId: string }) {
  const lab = useLab();
  const c = useCalibrationQuery(lab.id, machineId);
  if (!c.data) return null;
  return (
    <Text variant="label" color="inkMuted" testID="run-calibration">
      Estimates: {calibrationNote(c.data)}
    </Text>
  );
}

export function Big({ label, value, testID, tone }: { label: string; value: string; testID?: string; tone?: 'teal' }) {
  return (
    <View style={stageStyles.big}>
      <Text variant="label" color="inkMuted">
        {label}
      </Text>
      <Figure variant="figureLarge" testID={testID} color={tone ?? 'ink'} style={{ fontSize: 26, lineHeight: 32 }}>
        {value}
      </Figure>
    </View>
  );
}

export function Progress({ fraction }: { fraction: number }) {
  return (
    <View style={stageStyles.track} accessibilityRole="progressbar" accessibilityValue={{ min: 0, max: 100, now: Math.round(fraction * 100) }}>
      <View style={[stageStyles.fill, { width: `${Math.round(Math.min(1, Math.max(0, fraction)) * 100)}%` }]} />
    </View>
  );
}

/** Layout shared by the stages of a run card. */
export const stageStyles = StyleSheet.create({
  stage: { gap: spacing.lg },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  big: { flexGrow: 1, flexBasis: 140, gap: spacing.xxs },
  actions: { gap: spacing.md },
  confirm: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.powder, borderWidth: 2, borderColor: colors.ember },
  confirmEarly: { backgroundColor: colors.dangerSoft, borderColor: colors.danger },
  track: { height: 12, borderRadius: 6, backgroundColor: colors.powderDeep, overflow: 'hidden' },
  fill: { height: 12, backgroundColor: colors.ember },
});
