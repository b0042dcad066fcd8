import { ScrollView, StyleSheet, View } from 'react-native';
import { colors, radius, spacing, useIsWide } from '../theme';
import { Text } from '../ui';
import { Wordmark } from '../lab/Wordmark';

/**
 * Signed-out pages: a form on powder; on a wide screen a graphite panel
 * beside it says what the product is for.
 */
export function AuthFrame({ title, subtitle, children, testID }: { title: string; subtitle?: string; children: React.ReactNode; testID?: string }) {
  const wide = useIsWide();
  return (
    <View style={styles.root} testID={testID}>
      {wide ? (
        <View style={styles.panel}>
          <Wordmark tone="dark" size="lg" />
          <View style={styles.panelBody}>
            <Bed />
            <Text variant="display" color="onGraphite" style={{ maxWidth: 420 }}>
              From part requests to cooled, counted builds.
            </Text>
            <Text variant="body" color="onGraphiteMuted" style={{ maxWidth: 420 }}>
              Designers file parts, planners pack dense builds, leads approve the queue, operators run each build from a phone at the machine.
            </Text>
          </View>
          <Text variant="caption" color="onGraphiteMuted">
            For polymer powder-bed fusion labs.
          </Text>
        </View>
      ) : null}
      <ScrollView style={styles.formSide} contentContainerStyle={[styles.formContent, wide && styles.formContentWide]} keyboardShouldPersistTaps="handled">
        <View style={styles.formColumn}>
          {wide ? null : <Wordmark size="lg" />}
          <View style={styles.titles}>
            <Text variant="title" accessibilityRole="header">
              {title}
            </Text>
            {subtitle ? (
              <Text variant="body" color="inkMuted">
                {subtitle}
              </Text>
            ) : null}
          </View>
          {children}
        </View>
      </ScrollView>
    </View>
  );
}

/** A cross-section of a build: layers of powder with a few fused parts in them. */
function Bed() {
  const rows = [
    [0.1, 0.25, 0.55, 0.2],
    [0.35, 0.15, 0.6, 0.3],
    [0.05, 0.4, 0.7, 0.18],
    [0.2, 0.3, 0.62, 0.12],
  ];
  return (
    <View style={styles.bed} accessibilityElementsHidden importantForAccessibility="no">
      {rows.map((r, i) => (
        <View key={i} style={styles.bedRow}>
          <View style={[styles.fused, { left: `${r[0] * 100}%`, width: `${r[1] * 100}%` }]} />
          <View style={[styles.fused, i === 0 && styles.hot, { left: `${r[2] * 100}%`, width: `${r[3] * 100}%` }]} />
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, flexDirection: 'row', backgroundColor: colors.powder },
  panel: { width: '42%', maxWidth: 620, backgroundColor: colors.graphite, padding: spacing.xxxl, justifyContent: 'space-between' },
  panelBody: { gap: spacing.lg },
  bed: { gap: 6, maxWidth: 420, marginBottom: spacing.lg },
  bedRow: { height: 14, borderRadius: radius.sm, backgroundColor: colors.graphiteRaised, overflow: 'hidden' },
  fused: { position: 'absolute', top: 3, bottom: 3, borderRadius: 3, backgroundColor: colors.onGraphiteMuted },
  hot: { backgroundColor: colors.ember },
  formSide: { flex: 1 },
  formContent: { flexGrow: 1, padding: spacing.xl, paddingTop: spacing.xxxl },
  formContentWide: { justifyContent: 'center', padding: spacing.xxxl },
  formColumn: { width: '100%', maxWidth: 440, alignSelf: 'center', gap: spacing.xl },
  titles: { gap: spacing.xs },
});
