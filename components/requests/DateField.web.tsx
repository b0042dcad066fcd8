import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, fonts, radius, spacing, touchTarget } from '../theme';
import { Text } from '../ui';
import type { DateFieldProps } from './DateField';

export type { DateFieldProps } from './DateField';

/** The browser's own date input: a calendar on phones, typed digits on a desktop; its value is always YYYY-MM-DD. */
export function DateField({ label, value, onChange, error, testID, min }: DateFieldProps) {
  const [focused, setFocused] = useState(false);
  return (
    <View style={styles.field}>
      <Text variant="label" color="inkMuted">
        {label}
      </Text>
      <input
        type="date"
        data-testid={testID}
        aria-label={label}
        aria-invalid={!!error}
        value={value}
        min={min}
        onChange={(e) => onChange(e.currentTarget.value)}
        onFocus={() => setFocused(true)}
        onBlur={() => setFocused(false)}
        style={{
          minHeight: touchTarget,
          boxSizing: 'border-box',
          width: '100%',
          borderStyle: 'solid',
          borderWidth: focused ? 2 : 1,
          borderColor: error ? colors.danger : focused ? colors.ember : colors.lineStrong,
          borderRadius: radius.md,
          backgroundColor: error ? colors.dangerSoft : colors.surface,
          paddingLeft: focused ? spacing.md - 1 : spacing.md,
          paddingRight: spacing.md,
          fontFamily: fonts.mono,
          fontSize: 15,
          color: colors.ink,
          outline: 'none',
        }}
      />
      {error ? (
        <Text variant="caption" color="danger" testID={testID ? `${testID}-error` : undefined} accessibilityRole="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  field: { gap: spacing.xs },
});
