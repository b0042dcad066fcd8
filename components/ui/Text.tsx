import { Text as RNText, type TextProps as RNTextProps, StyleSheet } from 'react-native';
import { colors, type, type ColorName, type TypeVariant } from '../theme';

export type TextProps = RNTextProps & {
  variant?: TypeVariant;
  color?: ColorName;
  align?: 'left' | 'center' | 'right';
};

export function Text({ variant = 'body', color = 'ink', align, style, ...rest }: TextProps) {
  return <RNText {...rest} style={[styles.base, type[variant], { color: colors[color] }, align && { textAlign: align }, style]} />;
}

/** A number or measurement: always set in the monospaced face so columns line up. */
export function Figure({ variant = 'figure', ...rest }: TextProps) {
  return <Text variant={variant} {...rest} />;
}

const styles = StyleSheet.create({
  base: {},
});
