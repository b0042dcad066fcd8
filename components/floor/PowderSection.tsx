import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { usePlanPowderQuery, useRecoveryMutation } from '../queries/powder';
import { colors, radius, spacing } from '../theme';
import { Button, Field, Figure, Notice, Text } from '../ui';
import { checkLoad, type LoadCheck } from '../../shared/powder';
import type { PlanPowderView } from '../../shared/schemas/powder';
import { kgUpText, roundUpKg } from '../../shared/floor';

const kg = (v: number) => `${v.toFixed(1)} kg`;
/** A lot's share of a load: to 10 g, so that small draws do not read 0.0 kg and the draws add up to the load. */
const drawKg = (v: number) => `${v.toFixed(2)} kg`;
const parse = (t: string) => (t.trim() === '' ? Number.NaN : Number(t.trim().replace(',', '.')));
const todayText = () => new Date().toISOString().slice(0, 10);

export type PowderLoad = {
  view: PlanPowderView | undefined;
  check: LoadCheck;
  /** Lot kilograms as the operator corrected them (text per lot id); null: oldest first. */
  picks: Record<string, string> | null;
  setPicks: (p: Record<string, string> | null) => void;
  /** The lots to send with the start: what the card showed (undefined when the stock is not kept). */
  lots: Array<{ lotId: string; kg: number }> | undefined;
};

/**
 * The powder side of a start: the plan's stock view, and the load the
 * operator has entered checked against it as the server will check it.
 */
export function usePowderLoad(planId: string, freshKg: number, reusedKg: number): PowderLoad {
  const lab = useLab();
  const q = usePlanPowderQuery(lab.id, planId, { refetchMs: 10_000 });
  const [picks, setPicks] = useState<Record<string, string> | null>(null);
  const view = q.data;
  const check = useMemo(() => {
    if (!view) return checkLoad({ tracked: false, materialName: '', lots: [], reusedKg: 0, reusedMeanAgeBuilds: 0, policy: { maxMeanAgeBuilds: 0, minRefreshRatio: 0, minMvrCm3Per10Min: null, reorderLevelKg: 0, leadTimeDays: 0 }, lastCheck: null }, 0, 0, null, '');
    const stock = {
      tracked: view.tracked,
      materialName: view.material.name,
      lots: view.lots,
      reusedKg: view.stock.reusedKg,
      reusedMeanAgeBuilds: view.stock.reusedMeanAgeBuilds,
      policy: view.policy,
      lastCheck: view.lastCheck,
    };
    // Before the operator enters amounts, the card shows the plan's own, rounded up as the floor shows and loads them.
    const fresh = Number.isFinite(freshKg) ? freshKg : roundUpKg(view.planned?.freshKg ?? 0);
    const reused = Number.isFinite(reusedKg) ? reusedKg : roundUpKg(view.planned?.reusedKg ?? 0);
    const picked = picks ? Object.entries(picks).map(([lotId, t]) => ({ lotId, kg: parse(t) })).filter((x) => Number.isFinite(x.kg) && x.kg > 0) : null;
    return checkLoad(stock, fresh, reused, picked, todayText());
  }, [view, freshKg, reusedKg, picks]);
  const lots = view?.tracked && Number.isFinite(freshKg) ? check.draws.map((d) => ({ lotId: d.lotId, kg: d.kg })) : undefined;
  return { view, check, picks, setPicks, lots };
}

/**
 * Powder before the start: what the plan takes, which lots to draw (oldest
 * first, the operator may correct them), what the stock leaves, and the
 * material's warnings; a shortage shows here before the operator presses
 * Start. `onUse` fills the load fields with the plan's amounts.
 */
export function PowderBeforeStart({ load, onUse, canAct }: { load: PowderLoad; onUse?: (freshKg: number, reusedKg: number) => void; canAct: boolean }) {
  const p = load.view;
  if (!p) return null;
  if (!p.tracked) {
    return (
      <View style={styles.box} testID="floor-powder-untracked">
        <Text variant="overline" color="inkMuted">
          Powder · {p.material.name}
        </Text>
        <Text variant="body" color="inkMuted">
          {`The lab keeps no stock of ${p.material.name} in Sinterstack, so this start is not checked against the shelf and draws no lots. A lead starts keeping it by receiving a lot or recording a count in Powder.`}
        </Text>
      </View>
    );
  }
  const { check, picks, setPicks } = load;
  const editing = picks !== null;
  const startEditing = () => setPicks(Object.fromEntries(p.lots.map((l) => [l.id, String(check.draws.find((d) => d.lotId === l.id)?.kg ?? '')])));
  return (
    <View style={styles.box} testID="floor-powder">
      <Text variant="overline" color="inkMuted">
        Powder from the stock · {p.material.name}
      </Text>
      {p.planned ? (
        <Text variant="body" testID="floor-powder-plan">
          {`The plan loads ${kgUpText(p.planned.freshKg)} fresh and ${kgUpText(p.planned.reusedKg)} reused (mean age ${p.stock.reusedMeanAgeBuilds.toFixed(1)} builds).`}
        </Text>
      ) : null}
      <Figure variant="figure" color="inkMuted">{`On hand: ${kg(p.stock.freshKg)} fresh, ${kg(p.stock.reusedKg)} reused`}</Figure>
      {p.planned && onUse && canAct ? (
        <Button
          label="Load the plan's amounts"
          variant="secondary"
          size="sm"
          onPress={() => onUse(roundUpKg(p.planned!.freshKg), roundUpKg(p.planned!.reusedKg))}
          testID="floor-powder-use"
        />
      ) : null}
      <View style={{ gap: spacing.xs }} testID="floor-powder-lots">
        <Text variant="label">{editing ? 'Fresh powder drawn from each lot' : 'Draw the fresh powder from (oldest first)'}</Text>
        {editing
          ? p.lots.map((l) => (
              <Field
                key={l.id}
                label={`Lot ${l.code}`}
                unit="kg"
                hint={`${kg(l.onHandKg)} on hand · received ${l.receivedOn}${l.expiresOn && l.expiresOn < todayText() ? ' · expired' : ''}`}
                value={picks![l.id] ?? ''}
                onChangeText={(t) => setPicks({ ...picks!, [l.id]: t })}
                keyboardType="decimal-pad"
                testID={`floor-powder-lot-${l.code}`}
                mono
              />
            ))
          : check.draws.length > 0
            ? check.draws.map((d) => (
                <Text key={d.lotId} variant="body" testID={`floor-powder-draw-${d.code}`}>
                  {`Lot ${d.code}: ${drawKg(d.kg)}`}
                </Text>
              ))
            : (
                <Text color="inkMuted">No lot with powder left.</Text>
              )}
        {canAct && p.lots.length > 0 ? (
          editing ? (
            <Button label="Back to oldest first" variant="ghost" size="sm" onPress={() => setPicks(null)} testID="floor-powder-oldest" />
          ) : (
            <Button label="Correct the lots" variant="ghost" size="sm" onPress={startEditing} testID="floor-powder-change" />
          )
        ) : null}
      </View>
      {check.problems.length > 0 ? (
        <Notice tone="danger" title="The stock does not cover this load" testID="floor-powder-short">
          {check.problems.join(' ')}
        </Notice>
      ) : null}
      {check.warnings.map((w) => (
        <Notice key={w.code} tone="caution" testID={`floor-powder-warning-${w.code}`}>
          {w.message}
        </Notice>
      ))}
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
