import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Text } from './Text';

export type ChoiceOption<V extends string> = { value: V; label: string; testID?: string; accessibilityLabel?: string };

/**
 * One of a few options side by side, each with a round mark (a radio group):
 * the single-choice control of every screen (material, machine, layer height,
 * orientation, filters). Check-box chips (ToggleChip) are for several at once.
 * Wraps on a phone.
 */
export function Choice<V extends string>({
  label,
  options,
  value,
  onChange,
  disabled,
  testID,
  hint,
  compact,
}: {
  label?: string;
  options: ChoiceOption<V>[];
  /** The chosen option; null when none is chosen yet. */
  value: V | null;
  /** Absent: read only. */
  onChange?: (v: V) => void;
  disabled?: boolean;
  testID?: string;
  hint?: string;
  /** Smaller targets for dense panes (the plan editor). */
  compact?: boolean;
}) {
  const readOnly = !onChange;
  return (
    <View style={styles.field} testID={testID}>
      {label ? (
        <Text variant="label" color="inkMuted">
          {label}
        </Text>
      ) : null}
      <View style={styles.row} accessibilityRole="radiogroup" accessibilityLabel={label}>
        {options.map((o) => {
          const on = o.value === value;
          return (
            <Pressable
              key={o.value}
              testID={o.testID ?? (testID ? `${testID}-${o.value}` : undefined)}
              accessibilityRole="radio"
              accessibilityState={{ checked: on, disabled: disabled || readOnly }}
              accessibilityLabel={o.accessibilityLabel}
              aria-checked={on}
              disabled={disabled || readOnly}
              onPress={() => onChange?.(o.value)}
              style={({ pressed }) => [styles.option, compact && styles.compact, on ? styles.on : styles.off, pressed && styles.pressed, disabled && styles.disabled]}
            >
              <View style={[styles.mark, on && styles.markOn]}>{on ? <View style={styles.dot} /> : null}</View>
              <Text variant="label" color={on ? 'onGraphite' : 'ink'}>
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {hint ? (
        <Text variant="caption" color="inkFaint">
          {hint}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  field: { gap: spacing.xs, flexShrink: 1, maxWidth: '100%' },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  option: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, minHeight: 40, paddingHorizontal: spacing.md, borderRadius: radius.md, borderWidth: 1 },
  compact: { minHeight: 32, paddingHorizontal: spacing.sm },
  mark: { width: 14, height: 14, borderRadius: 7, borderWidth: 1.5, borderColor: colors.lineStrong, alignItems: 'center', justifyContent: 'center' },
  markOn: { borderColor: colors.ember },
  dot: { width: 6, height: 6, borderRadius: 3, backgroundColor: colors.ember },
  on: { backgroundColor: colors.graphite, borderColor: colors.graphite },
  off: { backgroundColor: colors.surface, borderColor: colors.lineStrong },
  pressed: { opacity: 0.8 },
  disabled: { opacity: 0.5 },
});
