/**
 * Controls sized for the machine floor: gloved hands, one thumb, a phone at
 * arm's length. Every target is at least FLOOR_TARGET px high.
 */
import { forwardRef } from 'react';
import { ActivityIndicator, Pressable, StyleSheet, TextInput as RNTextInput, View } from 'react-native';
import Svg, { Path } from 'react-native-svg';
import { colors, fonts, radius, spacing } from '../theme';
import { Text } from '../ui';

export const FLOOR_TARGET = 56;

type Tone = 'primary' | 'secondary' | 'danger';
const TONES: Record<Tone, { bg: string; pressed: string; fg: string; border: string }> = {
  primary: { bg: colors.ember, pressed: colors.emberPressed, fg: colors.onEmber, border: colors.ember },
  secondary: { bg: colors.surface, pressed: colors.powderDeep, fg: colors.ink, border: colors.lineStrong },
  danger: { bg: colors.surface, pressed: colors.dangerSoft, fg: colors.danger, border: colors.danger },
};

export function FloorButton({
  label,
  onPress,
  tone = 'primary',
  disabled,
  loading,
  testID,
  hint,
}: {
  label: string;
  onPress: () => void;
  tone?: Tone;
  disabled?: boolean;
  loading?: boolean;
  testID?: string;
  hint?: string;
}) {
  const t = TONES[tone];
  const inactive = disabled || loading;
  return (
    <Pressable
      testID={testID}
      accessibilityRole="button"
      accessibilityLabel={label}
      accessibilityHint={hint}
      accessibilityState={{ disabled: !!inactive, busy: !!loading }}
      aria-disabled={!!inactive}
      disabled={inactive}
      onPress={onPress}
      style={({ pressed }) => [
        styles.button,
        { backgroundColor: pressed ? t.pressed : t.bg, borderColor: t.border, opacity: inactive ? 0.5 : 1 },
      ]}
    >
      {loading ? <ActivityIndicator color={t.fg} /> : null}
      <Text variant="heading" style={{ color: t.fg, fontSize: 18 }}>
        {label}
      </Text>
    </Pressable>
  );
}

/** One thing to confirm: the whole row is the target. */
export function CheckRow({ label, checked, onToggle, testID, disabled }: { label: string; checked: boolean; onToggle: () => void; testID?: string; disabled?: boolean }) {
  return (
    <Pressable
      testID={testID}
      accessibilityRole="checkbox"
      accessibilityLabel={label}
      accessibilityState={{ checked, disabled: !!disabled }}
      aria-checked={checked}
      disabled={disabled}
      onPress={onToggle}
      style={({ pressed }) => [styles.check, checked && styles.checkOn, pressed && { opacity: 0.85 }]}
    >
      <View style={[styles.box, checked && styles.boxOn]}>
        {checked ? (
          <Svg width={20} height={20} viewBox="0 0 12 12">
            <Path d="M2.5 6.2 5 8.6 9.6 3.6" stroke={colors.surface} strokeWidth={1.8} fill="none" strokeLinecap="round" strokeLinejoin="round" />
          </Svg>
        ) : null}
      </View>
      <Text variant="bodyStrong" style={{ flex: 1, fontSize: 17, lineHeight: 24 }}>
        {label}
      </Text>
    </Pressable>
  );
}

/** One of a few answers to one question, as full-width rows with a round mark: the floor's single choice. */
export function RadioRows<V extends string>({
  label,
  options,
  value,
  onChange,
  testID,
}: {
  label: string;
  options: { value: V; label: string }[];
  value: V;
  onChange: (v: V) => void;
  testID?: string;
}) {
  return (
    <View style={styles.radioRows} accessibilityRole="radiogroup" accessibilityLabel={label}>
      {options.map((o) => {
        const on = o.value === value;
        return (
          <Pressable
            key={o.value}
            testID={testID ? `${testID}-${o.value}` : undefined}
            accessibilityRole="radio"
            accessibilityLabel={o.label}
            accessibilityState={{ checked: on }}
            aria-checked={on}
            onPress={() => onChange(o.value)}
            style={({ pressed }) => [styles.check, styles.radioRow, on && styles.checkOn, pressed && { opacity: 0.85 }]}
          >
            <View style={[styles.radioMark, on && styles.radioMarkOn]}>{on ? <View style={styles.radioDot} /> : null}</View>
            <Text variant="bodyStrong" style={{ flex: 1, fontSize: 17, lineHeight: 24 }}>
              {o.label}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

export const FloorInput = forwardRef<
  RNTextInput,
  { label: string; value: string; onChangeText: (t: string) => void; unit?: string; error?: string | null; hint?: string; testID?: string; keyboard?: 'decimal-pad' | 'number-pad' | 'default'; multiline?: boolean }
>(function FloorInput({ label, value, onChangeText, unit, error, hint, testID, keyboard = 'decimal-pad', multiline }, ref) {
  return (
    <View style={{ gap: spacing.xs }}>
      <Text variant="bodyStrong" style={{ fontSize: 16 }}>
        {label}
      </Text>
      <View style={styles.inputRow}>
        <RNTextInput
          ref={ref}
          testID={testID}
          accessibilityLabel={label}
          aria-invalid={!!error}
          value={value}
          onChangeText={onChangeText}
          keyboardType={keyboard}
          inputMode={keyboard === 'default' ? 'text' : keyboard === 'number-pad' ? 'numeric' : 'decimal'}
          multiline={multiline}
          style={[styles.input, multiline && styles.inputMulti, !!error && styles.inputInvalid]}
          placeholderTextColor={colors.inkFaint}
        />
        {unit ? (
          <Text variant="heading" color="inkMuted" style={{ minWidth: 28 }}>
            {unit}
          </Text>
        ) : null}
      </View>
      {error ? (
        <Text variant="label" color="danger" accessibilityRole="alert" testID={testID ? `${testID}-error` : undefined}>
          {error}
        </Text>
      ) : hint ? (
        <Text variant="label" color="inkMuted">
          {hint}
        </Text>
      ) : null}
    </View>
  );
});

/** A count with big minus and plus buttons either side, for one thumb. */
export function CountStepper({ label, value, onChange, max, testID, error }: { label: string; value: number; onChange: (n: number) => void; max: number; testID?: string; error?: string | null }) {
  const set = (n: number) => onChange(Math.max(0, Math.min(max, n)));
  return (
    <View style={{ gap: spacing.xs }}>
      <Text variant="bodyStrong" style={{ fontSize: 16 }}>
        {label}
      </Text>
      <View style={styles.stepper}>
        <Pressable testID={testID ? `${testID}-minus` : undefined} accessibilityRole="button" accessibilityLabel={`One less: ${label}`} onPress={() => set(value - 1)} style={({ pressed }) => [styles.step, pressed && styles.stepPressed]}>
          <Text variant="title">−</Text>
        </Pressable>
        <RNTextInput
          testID={testID}
          accessibilityLabel={label}
          value={String(value)}
          onChangeText={(t) => {
            const n = Number.parseInt(t.replace(/\D+/g, ''), 10);
            set(Number.isFinite(n) ? n : 0);
          }}
          keyboardType="number-pad"
          inputMode="numeric"
          style={[styles.input, styles.countInput, !!error && styles.inputInvalid]}
        />
        <Pressable testID={testID ? `${testID}-plus` : undefined} accessibilityRole="button" accessibilityLabel={`One more: ${label}`} onPress={() => set(value + 1)} style={({ pressed }) => [styles.step, pressed && styles.stepPressed]}>
          <Text variant="title">+</Text>
        </Pressable>
      </View>
      {error ? (
        <Text variant="label" color="danger" accessibilityRole="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  button: {
    minHeight: 64,
    borderRadius: radius.lg,
    borderWidth: 2,
    alignItems: 'center',
    justifyContent: 'center',
    flexDirection: 'row',
    gap: spacing.sm,
    paddingHorizontal: spacing.lg,
    alignSelf: 'stretch',
  },
  check: {
    minHeight: FLOOR_TARGET,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.lineStrong,
    backgroundColor: colors.surface,
  },
  checkOn: { borderColor: colors.teal, backgroundColor: colors.tealSoft },
  box: { width: 32, height: 32, borderRadius: 6, borderWidth: 2, borderColor: colors.lineStrong, alignItems: 'center', justifyContent: 'center', backgroundColor: colors.surface },
  boxOn: { backgroundColor: colors.teal, borderColor: colors.teal },
  radioRows: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  radioRow: { flexGrow: 1, flexBasis: 140 },
  radioMark: { width: 28, height: 28, borderRadius: 14, borderWidth: 2, borderColor: colors.lineStrong, alignItems: 'center', justifyContent: 'center', backgroundColor: colors.surface },
  radioMarkOn: { borderColor: colors.teal },
  radioDot: { width: 14, height: 14, borderRadius: 7, backgroundColor: colors.teal },
  inputRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  input: {
    // A web input has an intrinsic width; without a zero basis it pushes the unit and the steppers off a phone's screen.
    flexGrow: 1,
    flexShrink: 1,
    flexBasis: 0,
    minWidth: 0,
    minHeight: FLOOR_TARGET,
    borderWidth: 2,
    borderColor: colors.lineStrong,
    borderRadius: radius.md,
    backgroundColor: colors.surface,
    paddingHorizontal: spacing.md,
    fontFamily: fonts.monoMedium,
    fontSize: 22,
    color: colors.ink,
  },
  inputMulti: { minHeight: 96, fontFamily: fonts.regular, fontSize: 17, paddingTop: spacing.sm, textAlignVertical: 'top' },
  inputInvalid: { borderColor: colors.danger, backgroundColor: colors.dangerSoft },
  stepper: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  step: {
    width: FLOOR_TARGET,
    height: FLOOR_TARGET,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.lineStrong,
    backgroundColor: colors.surface,
    alignItems: 'center',
    justifyContent: 'center',
  },
  stepPressed: { backgroundColor: colors.powderDeep },
  countInput: { textAlign: 'center' },
});
