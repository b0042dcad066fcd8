import { Pressable, StyleSheet, View } from 'react-native';
import Svg, { Path } from 'react-native-svg';
import { colors, radius, spacing } from '../theme';
import { Text } from './Text';

export type ToggleChipProps = {
  label: string;
  value: boolean;
  onChange?: (next: boolean) => void;
  disabled?: boolean;
  testID?: string;
  accessibilityLabel?: string;
  /** Compact chips for dense table rows; the default is a full 48 px target. */
  compact?: boolean;
};

/** An on/off chip with a check mark: used for roles. */
export function ToggleChip({ label, value, onChange, disabled, testID, accessibilityLabel, compact }: ToggleChipProps) {
  const readOnly = !onChange;
  return (
    <Pressable
      testID={testID}
      accessibilityRole="checkbox"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityState={{ checked: value, disabled: disabled || readOnly }}
      aria-checked={value}
      disabled={disabled || readOnly}
      onPress={() => onChange?.(!value)}
      style={({ pressed }) => [
        styles.chip,
        compact && styles.compact,
        value ? styles.on : styles.off,
        readOnly && !value && styles.hiddenOff,
        pressed && styles.pressed,
        disabled && styles.disabled,
      ]}
    >
      <View style={[styles.box, value && styles.boxOn]}>{value ? (
          <Svg width={12} height={12} viewBox="0 0 12 12">
            <Path d="M2.5 6.2 5 8.6 9.6 3.6" stroke={colors.surface} strokeWidth={1.8} fill="none" strokeLinecap="round" strokeLinejoin="round" />
          </Svg>
        ) : null}</View>
      <Text variant="label" color={value ? 'teal' : 'inkMuted'}>
        {label}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  chip: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    minHeight: 48,
    paddingHorizontal: spacing.md,
    borderRadius: radius.pill,
    borderWidth: 1,
  },
  compact: { minHeight: 32, paddingHorizontal: spacing.sm },
  on: { backgroundColor: colors.tealSoft, borderColor: colors.teal },
  off: { backgroundColor: colors.surface, borderColor: colors.lineStrong },
  hiddenOff: { opacity: 0.5 },
  pressed: { opacity: 0.8 },
  disabled: { opacity: 0.5 },
  box: {
    width: 16,
    height: 16,
    borderRadius: 4,
    borderWidth: 1.5,
    borderColor: colors.lineStrong,
    alignItems: 'center',
    justifyContent: 'center',
  },
  boxOn: { backgroundColor: colors.teal, borderColor: colors.teal },
});
