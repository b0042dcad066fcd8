import { useLab } from '../lab/useCurrentLab';
import { useLabCurrency } from '../queries/account';
import { StyleSheet, View } from 'react-native';
import { AreaPerLayerChart } from '../charts';
import { colors, radius, spacing } from '../theme';
import { Figure, Text } from '../ui';
import { byBoxesText, profileSourceText, type ShownNumbers } from './estimate';
import { hours, kg, mm, money, percent } from './format';

function Cell({ label, value, testID, tone }: { label: string; value: string; testID?: string; tone?: 'danger' }) {
  return (
    <View style={styles.cell}>
      <Text variant="overline" color="inkMuted">{label}</Text>
      <Figure testID={testID} color={tone === 'danger' ? 'danger' : 'ink'}>{value}</Figure>
    </View>
  );
}

/** The chosen or shown layout's estimate: time, cooling, powder, density, cost and the per-layer area. */
export function NumbersPane({
  numbers,
  title,
  bedAreaMm2,
  cutLayer,
  stackNote,
  floorNote,
  note,
  partNames,
}: {
  numbers: ShownNumbers | null;
  title: string;
  bedAreaMm2: number;
  cutLayer: number | null;
  /** What the layer count is made of (floor margin, parts, top margin). */
  stackNote?: string;
  /** The height no layout of the same parts can stand under, and what sets it. */
  floorNote?: string;
  note?: string;
  /** A placement's part name by its id (the request line), for the cost per part. */
  partNames?: ReadonlyMap<string, string>;
}) {
  const currency = useLabCurrency(useLab().id);
  if (!numbers) {
    return (
      <View style={styles.box} testID="plan-numbers-empty">
        <Text variant="heading">Numbers</Text>
        <Text color="inkMuted">Pack the plan or pick a layout to see its layers, hours, cooling, powder and cost.</Text>
      </View>
    );
  }
  const n = numbers;
  return (
    <View style={styles.box} testID="plan-numbers">
      <View style={{ gap: 2 }}>
        <Text variant="heading">Numbers</Text>
        <Text variant="caption" color="inkMuted" testID="plan-numbers-of">{title}</Text>
      </View>
      <View style={styles.grid}>
        <Cell label="Layers" value={String(n.layers)} testID="num-layers" />
        <Cell label="Used height" value={mm(n.heightMm)} testID="num-height" />
        <Cell label="Print" value={hours(n.printSeconds)} testID="num-print" />
        <Cell label="Cool in machine" value={hours(n.inMachineCoolingSeconds)} testID="num-cool-in" />
        <Cell label="Cool outside" value={hours(n.outsideCoolingSeconds)} testID="num-cool-out" />
        <Cell label="Packing density" value={percent(n.packingDensity)} testID="num-density" />
        <Cell label="Powder cake" value={kg(n.cakeKg)} testID="num-cake" />
        <Cell label="Fresh powder" value={kg(n.freshKg)} testID="num-fresh" />
        <Cell label="Reused powder" value={kg(n.reusedKg)} testID="num-reused" />
        <Cell label="Cost per part" value={money(n.costPerPart, currency)} testID="num-cost-part" />
        <Cell label="Placed" value={String(n.placed)} testID="num-placed" />
        <Cell label="Not placed" value={String(n.unplaced)} testID="num-unplaced" tone={n.unplaced > 0 ? 'danger' : undefined} />
      </View>
      {stackNote ? <Text variant="caption" color="inkMuted" testID="num-layers-note">{stackNote}</Text> : null}
      {floorNote ? <Text variant="caption" color="inkMuted" testID="num-floor">{floorNote}</Text> : null}
      {note ? <Text variant="caption" color="inkFaint">{note}</Text> : null}
      {n.cost ? <CostBreakdown cost={n.cost} total={n.totalCost} partNames={partNames} /> : null}
      <View style={{ gap: spacing.xs }}>
        <Text variant="label">Cross-section area per layer</Text>
        <Text variant="caption" color={n.profileSource === 'box' ? 'amber' : 'inkMuted'} testID="num-profile-source">
          {profileSourceText(n)}
        </Text>
        {byBoxesText(n) ? (
          <Text variant="caption" color="inkMuted" testID="num-by-boxes">
            {byBoxesText(n)}
          </Text>
        ) : null}
        <AreaPerLayerChart areaPerLayerMm2={n.areaPerLayerMm2} layerHeightMm={n.layerHeightMm} jumps={n.areaJumps} bedAreaMm2={bedAreaMm2} cutLayer={cutLayer} heightPx={110} />
      </View>
      <Text variant="caption" color="inkFaint">
        Estimates: cooling times follow heat conduction to the core of the powder cake, with the material's and machine's figures and the machine's calibration;
        handle the cake only at the handling temperature and follow the machine maker's instructions and your lab's local rules for hot powder.
      </Text>
    </View>
  );
}

/**
 * What the build costs and how it is shared: the lab's machine time, energy, inert gas, powder, labour and the
 * scrap allowance, then each part's share (by volume and height, docs/estimate.md), which add up to the total.
 */
function CostBreakdown({ cost, total, partNames }: { cost: NonNullable<ShownNumbers['cost']>; total: number; partNames?: ReadonlyMap<string, string> }) {
  const currency = useLabCurrency(useLab().id);
  const items: Array<[string, number]> = [
    [`Machine, ${cost.machineHours.toFixed(1)} h${cost.heldThroughOutsideCooling ? ' (held through outside cooling: one chamber)' : ''}`, cost.machineCost],
    ['Energy', cost.energyCost],
    ['Inert gas', cost.inertGasCost],
    ['Powder', cost.powderCost],
    ['Labour', cost.labourCost],
    ['Scrap allowance', cost.scrapCost],
  ];
  const sum = cost.perPart.reduce((s, p) => s + p.total, 0);
  return (
    <View style={{ gap: spacing.xs }} testID="num-cost">
      <Text variant="label">Cost of the build, from the lab's rates</Text>
      {items.map(([label, value]) => (
        <View key={label} style={styles.costRow}>
          <Text variant="caption" color="inkMuted" style={{ flex: 1 }}>{label}</Text>
          <Figure variant="figure">{money(value, currency)}</Figure>
        </View>
      ))}
      <View style={[styles.costRow, styles.costTotal]}>
        <Text variant="bodyStrong" style={{ flex: 1 }}>Total</Text>
        <Figure variant="figure" testID="num-cost-total">{money(total, currency)}</Figure>
      </View>
      {cost.perPart.length > 0 ? (
        <>
          <Text variant="label" style={{ marginTop: spacing.xs }}>Cost per part</Text>
          {cost.perPart.map((p) => (
            <View key={p.id} style={styles.costRow} testID={`num-cost-part-${p.id}`}>
              <Text variant="caption" color="inkMuted" style={{ flex: 1 }} numberOfLines={2}>
                {`${partNames?.get(p.id) ?? p.id} × ${p.count}, ${money(p.each, currency)} each`}
              </Text>
              <Figure variant="figure">{money(p.total, currency)}</Figure>
            </View>
          ))}
          <Text variant="caption" color="inkFaint" testID="num-cost-sum">
            {`The parts add up to ${money(sum, currency)}: machine time, energy and powder shared by each part's volume and height, labour equally.`}
          </Text>
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  costRow: { flexDirection: 'row', alignItems: 'baseline', gap: spacing.sm },
  costTotal: { borderTopWidth: 1, borderTopColor: colors.line, paddingTop: spacing.xxs },
  box: { gap: spacing.md, padding: spacing.lg, backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line },
  grid: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.md },
  cell: { width: '30%', minWidth: 96, flexGrow: 1, gap: 2 },
});
