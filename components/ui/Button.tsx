import { ActivityIndicator, Pressable, StyleSheet, View, type PressableProps } from 'react-native';
import { colors, radius, spacing, touchTarget, type ColorName } from '../theme';
import { Text } from './Text';

type Variant = 'primary' | 'secondary' | 'ghost' | 'danger';

export type ButtonProps = Omit<PressableProps, 'children' | 'style'> & {
  label: string;
  variant?: Variant;
  size?: 'md' | 'sm';
  loading?: boolean;
  icon?: React.ReactNode;
  fullWidth?: boolean;
};

const palette: Record<Variant, { bg: ColorName; bgPressed: ColorName; fg: ColorName; border: ColorName }> = {
  primary: { bg: 'ember', bgPressed: 'emberPressed', fg: 'onEmber', border: 'ember' },
  secondary: { bg: 'surface', bgPressed: 'powderDeep', fg: 'ink', border: 'lineStrong' },
  ghost: { bg: 'powder', bgPressed: 'powderDeep', fg: 'ink', border: 'powder' },
  danger: { bg: 'danger', bgPressed: 'danger', fg: 'onEmber', border: 'danger' },
};

export function Button({ label, variant = 'primary', size = 'md', loading, disabled, icon, fullWidth, ...rest }: ButtonProps) {
  const p = palette[variant];
  const inactive = disabled || loading;
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={rest.accessibilityLabel ?? label}
      accessibilityState={{ disabled: !!inactive, busy: !!loading }}
      disabled={inactive}
      {...rest}
      style={({ pressed }) => [
        styles.base,
        size === 'sm' && styles.small,
        fullWidth && styles.full,
        {
          backgroundColor: colors[pressed ? p.bgPressed : p.bg],
          borderColor: colors[p.border],
          opacity: inactive ? 0.55 : 1,
        },
      ]}
    >
      <View style={styles.inner}>
        {loading ? <ActivityIndicator size="small" color={colors[p.fg]} /> : icon}
        <Text variant="bodyStrong" color={p.fg} style={size === 'sm' && styles.smallLabel}>
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: touchTarget,
    paddingHorizontal: spacing.xl,
    borderRadius: radius.md,
    borderWidth: 1,
    justifyContent: 'center',
    alignItems: 'center',
    alignSelf: 'flex-start',
  },
  small: { minHeight: 36, paddingHorizontal: spacing.md },
  smallLabel: { fontSize: 13 },
  full: { alignSelf: 'stretch' },
  inner: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
});
