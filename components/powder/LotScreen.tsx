import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePowderLotQuery } from '../queries/powder';
import { colors, spacing } from '../theme';
import { Card, ErrorState, Figure, LinkPressable, LoadingState, Screen, Text } from '../ui';
import { formatDate, formatDateTime } from '../ui/format';
import { Movements } from './MaterialPowderScreen';
import { kgText } from './format';

/** A lot: what came in, what is left, and every build and request it went into (the recall question). */
export function LotScreen({ lotId }: { lotId: string }) {
  const lab = useLab();
  const q = usePowderLotQuery(lab.id, lotId);
  if (q.isPending) return <Screen title="Lot"><LoadingState label="Loading the lot…" /></Screen>;
  if (q.isError) return <Screen title="Lot"><ErrorState error={q.error} onRetry={() => q.refetch()} /></Screen>;
  const { lot, material, builds, movements } = q.data;
  return (
    <Screen
      title={`Lot ${lot.code}`}
      subtitle={`${material.name} · received ${formatDate(lot.receivedOn)}${lot.makerLot ? ` · maker's lot ${lot.makerLot}` : ''}`}
      above={
        <LinkPressable href={`/powder/${material.id}`} testID="lot-back">
          <Text variant="label" color="ember">
            ‹ {material.name}
          </Text>
        </LinkPressable>
      }
      testID="screen-powder-lot"
    >
      <View style={styles.figures}>
        <Figure variant="figureLarge">{kgText(lot.onHandKg)}</Figure>
        <Text color="inkMuted">{`left of ${kgText(lot.receivedKg)} received${lot.expiresOn ? `; expires ${formatDate(lot.expiresOn)}` : ''}`}</Text>
      </View>
      <Card title="Builds this lot went into" subtitle="With the requests whose parts they printed.">
        {builds.length === 0 ? <Text color="inkMuted">No build has drawn from this lot yet.</Text> : null}
        <View testID="lot-builds">
          {builds.map((b) => (
            <View key={b.runId} style={styles.row}>
              <View style={{ flexShrink: 1, gap: spacing.xxs }}>
                <Text variant="bodyStrong">{b.plan.name}</Text>
                <Text variant="caption" color="inkMuted">
                  started {formatDateTime(b.startedAt)}
                  {b.requests.length ? ` · for ${b.requests.map((r) => `“${r.title}”`).join(', ')}` : ''}
                </Text>
              </View>
              <Figure variant="figure">{kgText(b.kg)}</Figure>
            </View>
          ))}
        </View>
      </Card>
      <Card title="Movements">
        <Movements list={movements} />
      </Card>
    </Screen>
  );
}

const styles = StyleSheet.create({
  figures: { gap: spacing.xxs },
  row: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.md, paddingVertical: spacing.sm, borderBottomWidth: 1, borderBottomColor: colors.line },
});
