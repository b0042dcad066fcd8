import { StyleSheet, View } from 'react-native';
import { AreaPerLayerChart } from '../charts';
import { colors, radius, spacing } from '../theme';
import { Figure, Text } from '../ui';
import { profileSourceText, type ShownNumbers } from './estimate';
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
export function NumbersPane({ numbers, title, bedAreaMm2, cutLayer, note }: { numbers: ShownNumbers | null; title: string; bedAreaMm2: number; cutLayer: number | null; note?: string }) {
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
        <Cell label="Cost per part" value={money(n.costPerPart)} testID="num-cost-part" />
        <Cell label="Placed" value={String(n.placed)} testID="num-placed" />
        <Cell label="Not placed" value={String(n.unplaced)} testID="num-unplaced" tone={n.unplaced > 0 ? 'danger' : undefined} />
      </View>
      {note ? <Text variant="caption" color="inkFaint">{note}</Text> : null}
      <View style={{ gap: spacing.xs }}>
        <Text variant="label">Cross-section area per layer</Text>
        <Text variant="caption" color={n.profileSource === 'box' ? 'amber' : 'inkMuted'} testID="num-profile-source">
          {profileSourceText(n)}
        </Text>
        <AreaPerLayerChart areaPerLayerMm2={n.areaPerLayerMm2} layerHeightMm={n.layerHeightMm} jumps={n.areaJumps} bedAreaMm2={bedAreaMm2} cutLayer={cutLayer} heightPx={110} />
      </View>
      <Text variant="caption" color="inkFaint">
        Estimates: cooling times follow heat conduction to the core of the powder cake, with the material's and machine's figures and the machine's calibration;
        handle the cake only at the handling temperature and follow the machine maker's instructions and your lab's local rules for hot powder.
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.md, padding: spacing.lg, backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line },
  grid: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.md },
  cell: { width: '30%', minWidth: 96, flexGrow: 1, gap: 2 },
});
