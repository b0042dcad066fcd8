import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { usePlanPowderQuery, useRecoveryMutation } from '../queries/powder';
import { colors, radius, spacing } from '../theme';
import { Button, Field, Figure, Notice, Text } from '../ui';

const kg = (v: number) => `${v.toFixed(1)} kg`;
const parse = (t: string) => (t.trim() === '' ? Number.NaN : Number(t.trim().replace(',', '.')));

/**
 * Powder before the start: what the plan takes, which lots to draw (oldest
 * first), what the stock leaves, and the material's warnings; a shortage
 * shows here before the operator presses Start. `onUse` fills the load fields
 * with the proposed amounts.
 */
export function PowderBeforeStart({ planId, onUse }: { planId: string; onUse?: (freshKg: number, reusedKg: number) => void }) {
  const lab = useLab();
  const q = usePlanPowderQuery(lab.id, planId, { refetchMs: 10_000 });
  if (!q.data || !q.data.tracked) return null;
  const p = q.data;
  const short = (p.proposal?.shortfallKg ?? 0) > 0 || p.reusedShortfallKg > 0;
  return (
    <View style={styles.box} testID="floor-powder">
      <Text variant="overline" color="inkMuted">
        Powder from the stock · {p.material.name}
      </Text>
      {p.planned ? (
        <Text variant="body" testID="floor-powder-proposal">
          {`Draw ${kg(p.planned.freshKg)} fresh from `}
          {p.proposal && p.proposal.draws.length > 0 ? p.proposal.draws.map((d) => `lot ${d.code} (${kg(d.kg)})`).join(', ') : 'no lot'}
          {` and ${kg(p.planned.reusedKg)} reused (mean age ${p.stock.reusedMeanAgeBuilds.toFixed(1)} builds).`}
        </Text>
      ) : null}
      <Figure variant="figure" color="inkMuted">{`On hand: ${kg(p.stock.freshKg)} fresh, ${kg(p.stock.reusedKg)} reused`}</Figure>
      {short ? (
        <Notice tone="danger" title="Not enough powder for this build" testID="floor-powder-short">
          {[
            p.proposal && p.proposal.shortfallKg > 0 ? `${kg(p.proposal.shortfallKg)} of fresh ${p.material.name} short.` : '',
            p.reusedShortfallKg > 0 ? `${kg(p.reusedShortfallKg)} of reused ${p.material.name} short: load fresh powder in its place, or record a count if the shelf holds more.` : '',
          ]
            .filter(Boolean)
            .join(' ')}
        </Notice>
      ) : null}
      {p.warnings.map((w) => (
        <Notice key={w.code} tone={w.code === 'melt_flow' ? 'danger' : 'caution'} testID={`floor-powder-warning-${w.code}`}>
          {w.message}
        </Notice>
      ))}
      {p.planned && onUse ? (
        <Button label="Use these amounts" variant="secondary" size="sm" onPress={() => onUse(Math.ceil(p.planned!.freshKg * 10) / 10, Math.ceil(p.planned!.reusedKg * 10) / 10)} testID="floor-powder-use" />
      ) : null}
    </View>
  );
}

/** After breakout: the sieved powder back into the reused stock, and what of the cake was thrown away. */
export function PowderRecovery({ planId, canAct }: { planId: string; canAct: boolean }) {
  const lab = useLab();
  const q = usePlanPowderQuery(lab.id, planId);
  const save = useRecoveryMutation(lab.id, planId);
  const [recovered, setRecovered] = useState('');
  const [discarded, setDiscarded] = useState('');
  if (!q.data?.run) return null;
  const rec = q.data.run.recovery;
  const err = save.error;
  const fe = (f: string) => (isApiError(err) && err.field === f ? err.message : null);
  return (
    <View style={styles.box} testID="floor-recovery">
      <Text variant="overline" color="inkMuted">
        Powder back from this build
      </Text>
      {rec ? (
        <Text variant="body" testID="floor-recovery-done">{`Recorded: ${kg(rec.recoveredKg)} sieved back into the reused stock, ${kg(rec.discardedKg)} thrown away.`}</Text>
      ) : canAct ? (
        <>
          <Field label="Sieved back into the reused stock" unit="kg" value={recovered} onChangeText={setRecovered} keyboardType="decimal-pad" error={fe('recoveredKg')} testID="recovered-kg" mono />
          <Field label="Thrown away (caked, dirty)" unit="kg" value={discarded} onChangeText={setDiscarded} keyboardType="decimal-pad" error={fe('discardedKg')} testID="discarded-kg" mono />
          {err && !fe('recoveredKg') && !fe('discardedKg') ? <Notice tone="danger">{err.message}</Notice> : null}
          <Button
            label="Record the powder"
            variant="secondary"
            disabled={!Number.isFinite(parse(recovered))}
            loading={save.isPending}
            onPress={() => save.mutate({ recoveredKg: parse(recovered), ...(discarded.trim() ? { discardedKg: parse(discarded) } : {}) })}
            testID="recovery-submit"
          />
        </>
      ) : (
        <Text color="inkMuted">Not recorded yet.</Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line, backgroundColor: colors.surface },
});
