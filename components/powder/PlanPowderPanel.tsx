import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePlanPowderQuery } from '../queries/powder';
import { colors, radius, spacing } from '../theme';
import { Figure, LinkPressable, Notice, Text } from '../ui';
import { buildWarnings, clean, fillMeanAge, refreshRatioOf } from '../../shared/powder';
import { ageText, kgText, untrackedText } from './format';

function Cell({ label, value, testID, danger }: { label: string; value: string; testID?: string; danger?: boolean }) {
  return (
    <View style={styles.cell}>
      <Text variant="overline" color="inkMuted">{label}</Text>
      <Figure testID={testID} color={danger ? 'danger' : 'ink'}>{value}</Figure>
    </View>
  );
}

/**
 * What a plan's build does to the powder stock, for the layout shown: the
 * fresh and reused powder it takes, what the queue ahead takes, what is
 * left, and the material's rules the fill would break (mean age, refresh).
 */
export function PlanPowderPanel({ planId, freshKg, reusedKg, layoutLabel }: { planId: string; freshKg: number | undefined; reusedKg: number | undefined; layoutLabel: string }) {
  const lab = useLab();
  const q = usePlanPowderQuery(lab.id, planId);
  const p = q.data;
  if (!p) return null;
  const head = (
    <View style={{ gap: 2 }}>
      <Text variant="heading">Powder stock</Text>
      <Text variant="caption" color="inkMuted">{`${p.material.name} · ${layoutLabel}`}</Text>
    </View>
  );
  if (!p.tracked) {
    return (
      <View style={styles.box} testID="plan-powder-untracked">
        {head}
        <Text color="inkMuted">{untrackedText(p.material.name)}</Text>
      </View>
    );
  }
  if (freshKg === undefined || reusedKg === undefined || !Number.isFinite(freshKg) || !Number.isFinite(reusedKg)) {
    return (
      <View style={styles.box} testID="plan-powder">
        {head}
        <Text color="inkMuted">{`On hand: ${kgText(p.stock.freshKg)} fresh, ${kgText(p.stock.reusedKg)} reused. Pack the plan to see what its build takes.`}</Text>
      </View>
    );
  }
  const started = p.run !== null;
  const freshLeft = clean(p.stock.freshKg - p.queuedFreshKg - freshKg);
  const reusedLeft = clean(p.stock.reusedKg - reusedKg);
  const warnings = buildWarnings({ freshKg, reusedKg }, p.stock.reusedMeanAgeBuilds, p.policy, p.lastCheck);
  const fill = fillMeanAge(freshKg, reusedKg, p.stock.reusedMeanAgeBuilds);
  const ratio = refreshRatioOf(freshKg, reusedKg);
  return (
    <View style={styles.box} testID="plan-powder">
      {head}
      {started ? (
        <Text color="inkMuted">This build has started; its powder is in the stock's movements.</Text>
      ) : (
        <>
          <View style={styles.grid}>
            <Cell label="Fresh on hand" value={kgText(p.stock.freshKg)} testID="plan-powder-fresh" />
            <Cell label={`Queue ahead (${p.queuedPlans})`} value={kgText(p.queuedFreshKg)} testID="plan-powder-queued" />
            <Cell label="This build, fresh" value={kgText(freshKg)} />
            <Cell label="Fresh left after" value={kgText(freshLeft)} testID="plan-powder-fresh-left" danger={freshLeft < 0} />
            <Cell label="Reused on hand" value={kgText(p.stock.reusedKg)} />
            <Cell label="This build, reused" value={kgText(reusedKg)} />
            <Cell label="Reused left after" value={kgText(reusedLeft)} testID="plan-powder-reused-left" danger={reusedLeft < 0} />
            <Cell label="Fill: fresh · age" value={`${Math.round(ratio * 100)} % · ${ageText(fill)}`} testID="plan-powder-fill" />
          </View>
          {freshLeft < 0 ? (
            <Notice tone="danger" testID="plan-powder-short">
              {`After the queue ahead, ${p.material.name} is ${kgText(-freshLeft)} of fresh powder short for this build: order more before it reaches the machine.`}
            </Notice>
          ) : freshLeft < p.policy.reorderLevelKg ? (
            <Notice tone="caution" testID="plan-powder-reorder">
              {`This build takes the fresh stock below its reorder level of ${kgText(p.policy.reorderLevelKg)}.`}
            </Notice>
          ) : null}
          {reusedLeft < 0 ? (
            <Notice tone="caution" testID="plan-powder-reused-short">
              {`The reused stock holds ${kgText(p.stock.reusedKg)}; the operator will load ${kgText(-reusedLeft)} more fresh powder in its place unless more is sieved back first.`}
            </Notice>
          ) : null}
          {warnings.map((w) => (
            <Notice key={w.code} tone={w.code === 'melt_flow' ? 'danger' : 'caution'} testID={`plan-powder-warning-${w.code}`}>
              {w.message}
            </Notice>
          ))}
        </>
      )}
      <LinkPressable href={`/powder/${p.material.id}`} testID="plan-powder-link" accessibilityLabel={`Stock of ${p.material.name}`}>
        <Text variant="bodyStrong" color="ember">{`Stock of ${p.material.name} →`}</Text>
      </LinkPressable>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.md, padding: spacing.lg, backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line },
  grid: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.md },
  cell: { width: '45%', minWidth: 120, flexGrow: 1, gap: 2 },
});
