import { StyleSheet, View } from 'react-native';
import type { MaterialStockView } from '../../shared/schemas/powder';
import { useLab } from '../lab/useCurrentLab';
import { usePowderQuery } from '../queries/powder';
import { colors, radius, spacing, useIsWide } from '../theme';
import { Badge, EmptyState, ErrorState, Figure, LinkPressable, LoadingState, Screen, Text } from '../ui';
import { formatDate } from '../ui/format';
import { PowderCautions } from './PowderCautions';
import { ageText, kgText, untrackedText } from './format';
import { kgUpText } from '../../shared/floor';

/** Stock per material at a glance; a material opens its chart, lots, movements and checks. */
export function PowderScreen() {
  const lab = useLab();
  const q = usePowderQuery(lab.id);
  const wide = useIsWide();
  return (
    <Screen title="Powder" subtitle="Fresh lots and reused powder per material, what the queue will take, and how old the reused powder is." testID="screen-powder">
      {q.isPending ? (
        <LoadingState label="Loading the powder stock…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.materials.length === 0 ? (
        <EmptyState title="No materials yet" body="Add the lab's powders under Settings → Materials; their stock is kept here." who="Leads add materials." />
      ) : (
        <View style={[styles.grid, wide && styles.gridWide]}>
          {q.data.materials.map((m) => (
            <MaterialCard key={m.material.id} m={m} wide={wide} />
          ))}
        </View>
      )}
      <PowderCautions compact />
    </Screen>
  );
}

function MaterialCard({ m, wide }: { m: MaterialStockView; wide: boolean }) {
  const f = m.forecast;
  return (
    <LinkPressable
      href={`/powder/${m.material.id}`}
      testID={`powder-material-${m.material.id}`}
      accessibilityLabel={m.tracked ? `${m.material.name}: ${kgText(m.freshKg)} fresh, ${kgText(m.reusedKg)} reused` : `${m.material.name}: no stock kept yet`}
      style={({ pressed }) => [styles.card, wide && styles.cardWide, pressed && { backgroundColor: colors.powderDeep }]}
    >
      <View style={styles.titleLine}>
        <Text variant="heading" style={{ flexShrink: 1 }}>
          {m.material.name}
        </Text>
        {f.shortage ? <Badge tone="danger" label="Reorder now" testID="powder-shortage" /> : null}
        {m.reuseBlocked ? <Badge tone="danger" label="Reuse blocked" /> : null}
        {!m.tracked ? <Badge label="Not tracked yet" /> : null}
      </View>
      {m.tracked ? (
        <View style={styles.figures}>
          <Fig label="Fresh" value={kgText(m.freshKg)} />
          <Fig label="Reused" value={kgText(m.reusedKg)} />
          <Fig label="Reused age" value={ageText(m.reusedMeanAgeBuilds)} />
          <Fig label="Melt-flow" value={m.lastCheck ? `${m.lastCheck.mvrCm3Per10Min} cm³/10 min` : '–'} tone={m.lastCheck && !m.lastCheck.passed ? 'danger' : undefined} />
        </View>
      ) : (
        // No movement recorded: the stock is unknown, not empty.
        <Text color="inkMuted" testID="powder-untracked">
          {untrackedText(m.material.name)}
        </Text>
      )}
      <Text variant="caption" color={f.shortage ? 'danger' : 'inkMuted'}>
        {f.neededKg > 0
          ? `The queue needs ${kgUpText(f.neededKg)} fresh${f.belowReorderAt ? `; below the reorder level of ${kgText(m.policy.reorderLevelKg)} on ${formatDate(f.belowReorderAt)}` : ''}.`
          : 'Nothing queued needs this powder.'}
      </Text>
    </LinkPressable>
  );
}

function Fig({ label, value, tone }: { label: string; value: string; tone?: 'danger' }) {
  return (
    <View style={styles.fig}>
      <Text variant="overline" color="inkMuted">
        {label}
      </Text>
      <Figure variant="figure" color={tone === 'danger' ? 'danger' : 'ink'}>
        {value}
      </Figure>
    </View>
  );
}

const styles = StyleSheet.create({
  grid: { gap: spacing.md },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap' },
  card: { backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line, padding: spacing.lg, gap: spacing.sm },
  cardWide: { width: 540 },
  titleLine: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.lg },
  fig: { gap: spacing.xxs, minWidth: 120 },
});
