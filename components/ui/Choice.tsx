import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Text } from '../ui';

export type ChoiceOption<V extends string> = { value: V; label: string; testID?: string };

/** One of a few options side by side (a segmented control); wraps on a phone. */
export function Choice<V extends string>({
  label,
  options,
  value,
  onChange,
  disabled,
  testID,
  hint,
}: {
  label?: string;
  options: ChoiceOption<V>[];
  value: V;
  onChange: (v: V) => void;
  disabled?: boolean;
  testID?: string;
  hint?: string;
}) {
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
              accessibilityState={{ checked: on, disabled }}
              aria-checked={on}
              disabled={disabled}
              onPress={() => onChange(o.value)}
              style={({ pressed }) => [styles.option, on ? styles.on : styles.off, pressed && styles.pressed, disabled && styles.disabled]}
            >
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
  option: { minHeight: 40, paddingHorizontal: spacing.md, borderRadius: radius.md, borderWidth: 1, justifyContent: 'center' },
  on: { backgroundColor: colors.graphite, borderColor: colors.graphite },
  off: { backgroundColor: colors.surface, borderColor: colors.lineStrong },
  pressed: { opacity: 0.8 },
  disabled: { opacity: 0.5 },
});
