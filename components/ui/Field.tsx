import { forwardRef, useState } from 'react';
import { StyleSheet, TextInput as RNTextInput, View, type TextInputProps as RNTextInputProps } from 'react-native';
import { colors, fonts, radius, spacing, touchTarget } from '../theme';
import { Text } from './Text';

export type TextInputProps = RNTextInputProps & { invalid?: boolean; mono?: boolean };

export const TextInput = forwardRef<RNTextInput, TextInputProps>(function TextInput({ invalid, mono, style, onFocus, onBlur, ...rest }, ref) {
  const [focused, setFocused] = useState(false);
  return (
    <RNTextInput
      ref={ref}
      placeholderTextColor={colors.inkFaint}
      {...rest}
      onFocus={(e) => {
        setFocused(true);
        onFocus?.(e);
      }}
      onBlur={(e) => {
        setFocused(false);
        onBlur?.(e);
      }}
      style={[
        styles.input,
        mono && { fontFamily: fonts.mono },
        focused && styles.focused,
        invalid && styles.invalid,
        rest.editable === false && styles.readOnly,
        style,
      ]}
    />
  );
});

export type FieldProps = TextInputProps & {
  label: string;
  /** Unit shown after the label, e.g. "mm". */
  unit?: string;
  hint?: string;
  error?: string | null;
  testID?: string;
};

/** A labelled text input with its hint and its inline error. */
export function Field({ label, unit, hint, error, testID, ...input }: FieldProps) {
  return (
    <View style={styles.field}>
      <Text variant="label" color="inkMuted" nativeID={testID ? `${testID}-label` : undefined}>
        {label}
        {unit ? <Text variant="caption" color="inkFaint">{`  ${unit}`}</Text> : null}
      </Text>
      <TextInput
        testID={testID}
        accessibilityLabel={label}
        aria-invalid={!!error}
        invalid={!!error}
        {...input}
      />
      {error ? (
        <Text variant="caption" color="danger" testID={testID ? `${testID}-error` : undefined} accessibilityRole="alert">
          {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" color="inkFaint">
          {hint}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  field: { gap: spacing.xs },
  input: {
    minHeight: touchTarget,
    borderWidth: 1,
    borderColor: colors.lineStrong,
    borderRadius: radius.md,
    backgroundColor: colors.surface,
    paddingHorizontal: spacing.md,
    fontFamily: fonts.regular,
    fontSize: 15,
    color: colors.ink,
  },
  focused: { borderColor: colors.ember, borderWidth: 2, paddingHorizontal: spacing.md - 1 },
  invalid: { borderColor: colors.danger, backgroundColor: colors.dangerSoft },
  readOnly: { backgroundColor: colors.powderDeep, color: colors.inkMuted },
});
