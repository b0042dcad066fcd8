import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing, type ColorName } from '../theme';
import { Text } from './Text';

export type BadgeTone = 'neutral' | 'ember' | 'teal' | 'amber' | 'danger';

const tones: Record<BadgeTone, { bg: ColorName; fg: ColorName }> = {
  neutral: { bg: 'powderDeep', fg: 'inkMuted' },
  ember: { bg: 'emberSoft', fg: 'emberPressed' },
  teal: { bg: 'tealSoft', fg: 'teal' },
  amber: { bg: 'amberSoft', fg: 'amber' },
  danger: { bg: 'dangerSoft', fg: 'danger' },
};

export function Badge({ label, tone = 'neutral', testID }: { label: string; tone?: BadgeTone; testID?: string }) {
  const t = tones[tone];
  return (
    <View testID={testID} style={[styles.badge, { backgroundColor: colors[t.bg] }]}>
      <Text variant="label" color={t.fg} style={styles.text}>
        {label}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: { borderRadius: radius.pill, paddingHorizontal: spacing.sm, paddingVertical: spacing.xxs, alignSelf: 'flex-start' },
  text: { fontSize: 12, lineHeight: 16 },
});
