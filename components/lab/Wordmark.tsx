import { StyleSheet, View } from 'react-native';
import { colors, spacing } from '../theme';
import { Text } from '../ui';

/** Three fused layers of powder, the topmost still glowing. */
export function LogoMark({ size = 24 }: { size?: number }) {
  const h = Math.max(3, Math.round(size / 6));
  return (
    <View style={{ width: size, height: size, justifyContent: 'center', gap: Math.round(h / 2) }} accessibilityElementsHidden importantForAccessibility="no">
      <View style={{ height: h, width: size * 0.7, borderRadius: h / 2, backgroundColor: colors.ember, alignSelf: 'flex-end' }} />
      <View style={{ height: h, width: size, borderRadius: h / 2, backgroundColor: colors.inkFaint }} />
      <View style={{ height: h, width: size * 0.85, borderRadius: h / 2, backgroundColor: colors.lineStrong }} />
    </View>
  );
}

export function Wordmark({ tone = 'light', size = 'md' }: { tone?: 'light' | 'dark'; size?: 'md' | 'lg' }) {
  return (
    <View style={styles.row} accessibilityRole="header" accessibilityLabel="Sinterstack">
      <LogoMark size={size === 'lg' ? 32 : 22} />
      <Text variant={size === 'lg' ? 'title' : 'heading'} color={tone === 'dark' ? 'onGraphite' : 'ink'} style={styles.word}>
        Sinterstack
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  word: { letterSpacing: -0.3 },
});
