import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { MaterialDetailView, MovementView } from '../../shared/schemas/powder';
import { useLab } from '../lab/useCurrentLab';
import { usePowderMaterialQuery } from '../queries/powder';
import { colors, spacing, useIsWide } from '../theme';
import { Badge, Card, ErrorState, Figure, LinkPressable, LoadingState, Notice, Screen, Text } from '../ui';
import { formatDate, formatDateTime } from '../ui/format';
import { MeltFlowPanel } from './MeltFlowPanel';
import { MovementForm } from './MovementForm';
import { PolicyForm } from './PolicyForm';
import { PowderCautions } from './PowderCautions';
import { StockChart } from './StockChart';
import { MOVEMENT_LABELS, ageText, kgText, signedKg, untrackedText } from './format';

/** One powder: its stock over time and ahead, lots, movements, age, melt-flow checks and rules. */
export function MaterialPowderScreen({ materialId }: { materialId: string }) {
  const lab = useLab();
  const q = usePowderMaterialQuery(lab.id, materialId);
  const wide = useIsWide();
  const back = (
    <LinkPressable href="/powder" testID="powder-back">
      <Text variant="label" color="ember">
        ‹ All powders
      </Text>
    </LinkPressable>
  );
  if (q.isPending) return <Screen title="Powder" above={back}><LoadingState label="Loading the stock…" /></Screen>;
  if (q.isError) return <Screen title="Powder" above={back}><ErrorState error={q.error} onRetry={() => q.refetch()} /></Screen>;
  const d = q.data;
  const canMove = lab.has('operator') || lab.has('lead');
  const main = (
    <>
      <Summary d={d} />
      {d.tracked ? (
        <Card title="Stock over time and ahead" subtitle="From the ledger up to now; after now, the fresh stock the queued builds will leave.">
          <ChartFor d={d} />
        </Card>
      ) : null}
      <Card title="Fresh lots" subtitle="Oldest first: the order the floor draws them in.">
        {d.lots.length === 0 ? <Text color="inkMuted">No lots received yet.</Text> : null}
        {d.lots.map((l) => (
          <LinkPressable key={l.id} href={`/powder/lots/${l.id}`} testID={`lot-row-${l.code}`} style={({ pressed }) => [styles.row, pressed && { backgroundColor: colors.powderDeep }]}>
            <View style={styles.rowMain}>
              <Text variant="bodyStrong">{l.code}</Text>
              <Text variant="caption" color="inkMuted">
                received {formatDate(l.receivedOn)}
                {l.makerLot ? ` · maker's lot ${l.makerLot}` : ''}
                {l.expiresOn ? ` · expires ${formatDate(l.expiresOn)}` : ''}
              </Text>
            </View>
            <Figure variant="figure" color={l.onHandKg > 0 ? 'ink' : 'inkFaint'}>{`${kgText(l.onHandKg)} of ${kgText(l.receivedKg)}`}</Figure>
          </LinkPressable>
        ))}
      </Card>
      <Card title="Movements" subtitle="Every change to the stock, newest first. The stock is their sum.">
        <Movements list={d.movements.slice(0, 40)} />
      </Card>
    </>
  );
  const side = (
    <>
      {canMove ? (
        <Card title="Record a movement">
          <MovementForm materialId={d.material.id} lots={d.lots} />
        </Card>
      ) : (
        <Notice tone="info">Leads and operators record movements; you can follow the stock here.</Notice>
      )}
      <Card title="Melt-flow of the reused powder">
        <MeltFlowPanel materialId={d.material.id} checks={d.checks} thresholdCm3Per10Min={d.policy.minMvrCm3Per10Min} />
      </Card>
      <Card title="Rules for this powder">
        <PolicyForm key={JSON.stringify(d.policy)} materialId={d.material.id} policy={d.policy} />
      </Card>
      <PowderCautions compact />
    </>
  );
  return (
    <Screen title={d.material.name} subtitle="Powder stock" above={back} testID="screen-powder-material" maxWidth={1320}>
      {wide ? (
        <View style={styles.columns}>
          <View style={styles.mainCol}>{main}</View>
          <View style={styles.sideCol}>{side}</View>
        </View>
      ) : (
        <View style={styles.stack}>
          {main}
          {side}
        </View>
      )}
    </Screen>
  );
}

function Summary({ d }: { d: MaterialDetailView }) {
  const f = d.forecast;
  return (
    <View style={styles.stack}>
      {f.shortage ? (
        <Notice tone="danger" title="Reorder now" testID="powder-reorder">
          {`The queued builds take the fresh stock below ${kgText(d.policy.reorderLevelKg)} on ${formatDate(f.belowReorderAt)}, within the ${d.policy.leadTimeDays}-day lead time.${f.runsOutPlan ? ` It would not cover “${f.runsOutPlan.name}”.` : ''}`}
        </Notice>
      ) : null}
      {d.reuseBlocked ? (
        <Notice tone="danger" title="Reuse blocked" testID="powder-reuse-blocked">
          The reused powder failed its last melt-flow check. Builds load fresh powder only until a lead releases it.
        </Notice>
      ) : null}
      {d.tracked ? null : (
        <Notice tone="info" title="Not tracked yet" testID="powder-untracked">
          {untrackedText(d.material.name)}
        </Notice>
      )}
      <View style={styles.figures} testID="powder-summary">
        <Big label="Fresh on hand" value={d.tracked ? kgText(d.freshKg) : '–'} testID="powder-fresh" />
        <Big label="Reused on hand" value={d.tracked ? kgText(d.reusedKg) : '–'} testID="powder-reused" />
        <Big label="Reused powder's mean age" value={d.tracked ? ageText(d.reusedMeanAgeBuilds) : '–'} testID="powder-age" />
        <Big label="Last melt-flow" value={d.lastCheck ? `${d.lastCheck.mvrCm3Per10Min}` : '–'} unit={d.lastCheck ? 'cm³/10 min' : undefined} tone={d.lastCheck && !d.lastCheck.passed ? 'danger' : undefined} />
        <Big label="Queue needs (fresh)" value={kgText(f.neededKg)} />
      </View>
    </View>
  );
}

function Big({ label, value, unit, tone, testID }: { label: string; value: string; unit?: string; tone?: 'danger'; testID?: string }) {
  return (
    <View style={styles.big} testID={testID}>
      <Text variant="overline" color="inkMuted">
        {label}
      </Text>
      <Figure variant="figureLarge" color={tone === 'danger' ? 'danger' : 'ink'} style={{ fontSize: 26, lineHeight: 32 }}>
        {value}
      </Figure>
      {unit ? (
        <Text variant="caption" color="inkMuted">
          {unit}
        </Text>
      ) : null}
    </View>
  );
}

function ChartFor({ d }: { d: MaterialDetailView }) {
  const series = useMemo(
    () => ({
      history: d.history.map((p) => ({ atMs: Date.parse(p.at), freshKg: p.freshKg, reusedKg: p.reusedKg })),
      forecast: d.forecast.points.map((p) => ({ atMs: Date.parse(p.at), stockKg: p.stockKg, label: p.planName })),
      nowMs: Date.parse(d.forecast.points[0]?.at ?? new Date().toISOString()),
      reorderLevelKg: d.policy.reorderLevelKg,
    }),
    [d],
  );
  return <StockChart series={series} />;
}

export function Movements({ list }: { list: MovementView[] }) {
  if (list.length === 0) return <Text color="inkMuted">No movements yet.</Text>;
  return (
    <View testID="movement-list">
      {list.map((m) => (
        <View key={m.id} style={styles.row}>
          <View style={styles.rowMain}>
            <View style={styles.line}>
              <Text variant="bodyStrong">{MOVEMENT_LABELS[m.kind]}</Text>
              <Badge label={m.lot ? `lot ${m.lot.code}` : 'reused'} tone={m.lot ? 'ember' : 'teal'} />
            </View>
            <Text variant="caption" color="inkMuted">
              {formatDateTime(m.at)}
              {m.by ? ` · ${m.by.name}` : ''}
              {m.plan ? ` · ${m.plan.name}` : ''}
              {m.countedKg !== null ? ` · counted ${kgText(m.countedKg)}` : ''}
              {m.cakeDiscardedKg ? ` · ${kgText(m.cakeDiscardedKg)} of the cake thrown away` : ''}
              {m.reason ? ` · ${m.reason}` : ''}
            </Text>
          </View>
          <Figure variant="figure" color={m.deltaKg < 0 ? 'danger' : 'teal'}>
            {signedKg(m.deltaKg)}
          </Figure>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: spacing.xl, alignItems: 'flex-start' },
  mainCol: { flex: 3, gap: spacing.lg, minWidth: 0 },
  sideCol: { flex: 2, gap: spacing.lg, minWidth: 0 },
  stack: { gap: spacing.lg },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.lg },
  big: { minWidth: 140, gap: spacing.xxs },
  row: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.md, paddingVertical: spacing.sm, borderBottomWidth: 1, borderBottomColor: colors.line },
  rowMain: { flexShrink: 1, gap: spacing.xxs },
  line: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
});
