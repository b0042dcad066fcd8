import { StyleSheet, View } from 'react-native';
import type { Caution } from '../../shared/floor';
import { colors, radius, spacing } from '../theme';
import { Text } from '../ui';

/** The stage's cautions, most pressing first, and the reminder that local codes and the maker's instructions come first. */
export function Cautions({ cautions, deferral, testID = 'floor-cautions' }: { cautions: readonly Caution[]; deferral: string; testID?: string }) {
  if (cautions.length === 0) return null;
  return (
    <View style={styles.box} testID={testID} accessibilityRole="summary" accessibilityLabel="Cautions for this stage">
      <Text variant="overline" color="amber">
        Cautions for this stage
      </Text>
      {cautions.map((c) => (
        <View key={c.id} style={styles.caution} testID={`${testID}-${c.id}`}>
          <Text variant="bodyStrong" style={{ fontSize: 16 }}>
            ⚠ {c.title}
          </Text>
          {c.points.map((p) => (
            <Text key={p} variant="body" style={styles.point}>
              • {p}
            </Text>
          ))}
          <Text variant="caption" color="inkMuted">
            {c.reference}
          </Text>
        </View>
      ))}
      <Text variant="label" color="ink" testID={`${testID}-deferral`}>
        {deferral}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.md, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.amberSoft, borderLeftWidth: 5, borderLeftColor: colors.amber },
  caution: { gap: spacing.xxs },
  point: { fontSize: 16, lineHeight: 23, paddingLeft: spacing.xs },
});
