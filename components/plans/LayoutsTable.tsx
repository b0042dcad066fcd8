import { useLab } from '../lab/useCurrentLab';
import { useLabCurrency } from '../queries/account';
import { Pressable, StyleSheet, View } from 'react-native';
import type { LayoutSummaryView } from '../../shared/schemas/plans';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, Text } from '../ui';
import { numbersFromEstimate, type ShownNumbers } from './estimate';
import { hours, money, percent } from './format';

export interface LayoutRow {
  id: string;
  label: string;
  numbers: ShownNumbers | null;
  chosen: boolean;
  locked: boolean;
  matchesPlan: boolean;
  settings: string;
  working: boolean;
}

export function rowsOf(layouts: LayoutSummaryView[]): LayoutRow[] {
  return layouts.map((l) => ({
    id: l.id,
    label: l.label,
    numbers: numbersFromEstimate(l.estimate, { placedCount: l.placedCount, unplacedCount: l.unplacedCount }),
    chosen: l.chosen,
    locked: l.locked,
    matchesPlan: l.matchesPlan,
    settings: `${l.resultFormat === 'pack-result/2' ? 'by shape · ' : 'by boxes · '}${l.settings.layerHeightMm} mm layers · seed ${l.settings.seed} · ${l.settings.spacingMm} mm gap · ${(l.settings.timeLimitMs / 1000).toFixed(0)} s`,
    working: false,
  }));
}

type Metric = {
  key: string;
  title: string;
  get: (n: ShownNumbers) => number | null;
  show: (n: ShownNumbers, currency?: string) => string;
  better: 'low' | 'high';
  /** A second, smaller figure under it (the box estimate beside the one from the meshes). */
  beside?: (n: ShownNumbers) => string | null;
};
const METRICS: Metric[] = [
  { key: 'layers', title: 'Layers', get: (n) => n.layers, show: (n) => String(n.layers), better: 'low' },
  { key: 'hours', title: 'Print', get: (n) => n.printSeconds, show: (n) => hours(n.printSeconds), better: 'low', beside: (n) => (n.byBoxes && n.profileSource === 'mesh' ? `boxes ${hours(n.byBoxes.printSeconds)}` : null) },
  { key: 'density', title: 'Density', get: (n) => n.packingDensity, show: (n) => percent(n.packingDensity), better: 'high' },
  { key: 'cost', title: 'Cost/part', get: (n) => n.costPerPart, show: (n, currency) => money(n.costPerPart, currency), better: 'low' },
  { key: 'unplaced', title: 'Not placed', get: (n) => n.unplaced, show: (n) => String(n.unplaced), better: 'low' },
];

/**
 * The plan's layouts compared side by side: one column each, the same rows
 * of numbers, the best value of each row marked. The chosen one is the one
 * that goes to review.
 */
export function LayoutsTable({
  rows,
  shownId,
  editable,
  onShow,
  onChoose,
  onLock,
  onDelete,
  busyId,
}: {
  rows: LayoutRow[];
  shownId: string | null;
  editable: boolean;
  onShow: (id: string) => void;
  onChoose: (id: string) => void;
  onLock: (id: string, locked: boolean) => void;
  onDelete: (id: string) => void;
  busyId: string | null;
}) {
  const currency = useLabCurrency(useLab().id);
  if (rows.length === 0) {
    return (
      <Text color="inkMuted" testID="layouts-empty">
        No layouts kept yet. Pack the plan, then keep the layouts worth comparing.
      </Text>
    );
  }
  const best = new Map<string, number>();
  for (const m of METRICS) {
    const values = rows.map((r) => (r.numbers ? m.get(r.numbers) : null)).filter((v): v is number => v != null && Number.isFinite(v));
    if (values.length > 1 && Math.min(...values) !== Math.max(...values)) best.set(m.key, m.better === 'low' ? Math.min(...values) : Math.max(...values));
  }
  return (
    <View style={styles.wrap} testID="layouts-table">
      <View style={styles.columns}>
        {rows.map((r) => (
          <Pressable
            key={r.id}
            onPress={() => onShow(r.id)}
            style={[styles.column, r.id === shownId && styles.shown, r.chosen && styles.chosen]}
            accessibilityRole="button"
            accessibilityLabel={`Show ${r.label}`}
            testID={`layout-col-${r.working ? 'working' : r.id}`}
          >
            <View style={styles.head}>
              <Text variant="bodyStrong" numberOfLines={1}>{r.label}</Text>
              <View style={styles.badges}>
                {r.chosen ? <Badge label="Chosen" tone="teal" testID={`layout-chosen-${r.id}`} /> : null}
                {r.working ? <Badge label="Not kept" tone="amber" /> : null}
                {r.locked ? <Badge label="Locked" /> : null}
                {!r.matchesPlan ? <Badge label="Lines changed" tone="danger" /> : null}
                {r.numbers?.profileSource === 'box' ? <Badge label="Box estimate" tone="amber" testID={`layout-box-estimate-${r.working ? 'working' : r.id}`} /> : null}
              </View>
            </View>
            {METRICS.map((m) => {
              const v = r.numbers ? m.get(r.numbers) : null;
              const isBest = v != null && best.get(m.key) === v;
              return (
                <View key={m.key} style={[styles.metric, m.beside && styles.metricTwoLines]}>
                  <Text variant="caption" color="inkMuted">{m.title}</Text>
                  <View style={styles.figures}>
                    <Text variant="figure" style={isBest ? styles.best : undefined} testID={`layout-${m.key}-${r.working ? 'working' : r.id}`}>
                      {r.numbers ? m.show(r.numbers, currency) : '–'}
                    </Text>
                    {r.numbers && m.beside?.(r.numbers) ? (
                      <Text variant="caption" color="inkFaint" testID={`layout-${m.key}-boxes-${r.working ? 'working' : r.id}`}>
                        {m.beside(r.numbers)}
                      </Text>
                    ) : null}
                  </View>
                </View>
              );
            })}
            <Text variant="caption" color="inkFaint" numberOfLines={2}>{r.settings}</Text>
            {editable && !r.working ? (
              <View style={styles.actions}>
                {!r.chosen ? (
                  <Button label="Choose" size="sm" onPress={() => onChoose(r.id)} disabled={!r.matchesPlan} loading={busyId === r.id} testID={`layout-choose-${r.id}`} />
                ) : null}
                <Button label={r.locked ? 'Unlock' : 'Lock'} size="sm" variant="secondary" onPress={() => onLock(r.id, !r.locked)} testID={`layout-lock-${r.id}`} />
                {!r.locked && !r.chosen ? <Button label="Delete" size="sm" variant="ghost" onPress={() => onDelete(r.id)} testID={`layout-delete-${r.id}`} /> : null}
              </View>
            ) : null}
          </Pressable>
        ))}
      </View>
      <View style={styles.legend}>
        <View style={styles.legendSwatch} />
        <Text variant="caption" color="inkFaint" style={{ flexShrink: 1 }}>
          Teal: the best of the layouts on that row. A layout whose lines changed can no longer be chosen. Kept layouts are estimated from the parts' sliced shapes; a box estimate counts each part as its bounding box and reads high.
        </Text>
      </View>
    </View>
  );
}

const ROW = 26;
const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  columns: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  column: {
    flexGrow: 1,
    flexBasis: 150,
    maxWidth: 260,
    padding: spacing.sm,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    backgroundColor: colors.surface,
    gap: 2,
  },
  shown: { borderColor: colors.ember, borderWidth: 2, padding: spacing.sm - 1 },
  chosen: { backgroundColor: colors.tealSoft },
  head: { minHeight: 44, gap: 2 },
  badges: { flexDirection: 'row', flexWrap: 'wrap', gap: 4 },
  metric: { height: ROW, flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm },
  // A metric that may show a second figure keeps room for it in every column, so the rows stay level side by side.
  metricTwoLines: { height: ROW + 16, alignItems: 'flex-start', paddingTop: 2 },
  figures: { alignItems: 'flex-end' },
  best: { fontWeight: '700', color: colors.teal },
  legend: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  legendSwatch: { width: 10, height: 10, borderRadius: 2, backgroundColor: colors.teal },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs, marginTop: spacing.xs },
});
