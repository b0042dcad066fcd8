import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Text } from '../ui';
import { POWDER_CAUTIONS, POWDER_CAUTION_SOURCE, POWDER_DEFERRAL } from './cautions';

/** Cautions for handling the powder, shown where powder is moved. */
export function PowderCautions({ compact = false }: { compact?: boolean }) {
  return (
    <View style={styles.box} testID="powder-cautions" accessibilityRole="summary" accessibilityLabel="Cautions for handling powder">
      <Text variant="overline" color="amber">
        Handling powder safely
      </Text>
      {POWDER_CAUTIONS.map((c) => (
        <Text key={c.id} variant={compact ? 'caption' : 'body'}>
          <Text variant={compact ? 'caption' : 'bodyStrong'} style={{ fontWeight: '600' }}>
            ⚠ {c.title}:{' '}
          </Text>
          {c.text}
        </Text>
      ))}
      <Text variant="caption" color="inkMuted">
        {POWDER_CAUTION_SOURCE}
      </Text>
      <Text variant="label">{POWDER_DEFERRAL}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.lg, backgroundColor: colors.amberSoft, borderLeftWidth: 5, borderLeftColor: colors.amber },
});
