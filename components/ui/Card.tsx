import { StyleSheet, View, type ViewProps } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Text } from './Text';

export type CardProps = ViewProps & { title?: string; subtitle?: string; actions?: React.ReactNode; padded?: boolean };

export function Card({ title, subtitle, actions, padded = true, style, children, ...rest }: CardProps) {
  return (
    <View {...rest} style={[styles.card, padded && styles.padded, style]}>
      {title || actions ? (
        <View style={[styles.header, !padded && styles.headerUnpadded]}>
          <View style={styles.headerText}>
            {title ? (
              <Text variant="heading" accessibilityRole="header">
                {title}
              </Text>
            ) : null}
            {subtitle ? (
              <Text variant="caption" color="inkMuted">
                {subtitle}
              </Text>
            ) : null}
          </View>
          {actions}
        </View>
      ) : null}
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.line,
    gap: spacing.md,
    overflow: 'hidden',
  },
  padded: { padding: spacing.lg },
  header: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.md, flexWrap: 'wrap' },
  headerUnpadded: { paddingHorizontal: spacing.lg, paddingTop: spacing.lg },
  headerText: { flexShrink: 1, gap: spacing.xxs },
});
