import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { usePolicyMutation } from '../queries/powder';
import { spacing } from '../theme';
import { Button, Field, Notice, Text } from '../ui';
import { steadyStateFillAge, type PowderPolicy } from '../../shared/powder';
import { parseKg } from './format';

const fieldError = (e: unknown, f: string) => (isApiError(e) && e.field === f ? e.message : null);

/** A lead's rules for one powder: age and refresh limits, the melt-flow threshold, reorder level and lead time. */
export function PolicyForm({ materialId, policy }: { materialId: string; policy: PowderPolicy }) {
  const lab = useLab();
  const save = usePolicyMutation(lab.id, materialId);
  const [v, setV] = useState({
    maxMeanAgeBuilds: String(policy.maxMeanAgeBuilds),
    minRefreshPercent: String(Math.round(policy.minRefreshRatio * 1000) / 10),
    minMvr: policy.minMvrCm3Per10Min === null ? '' : String(policy.minMvrCm3Per10Min),
    reorderLevelKg: String(policy.reorderLevelKg),
    leadTimeDays: String(policy.leadTimeDays),
  });
  const [saved, setSaved] = useState(false);
  const set = (k: keyof typeof v) => (t: string) => {
    setSaved(false);
    setV((o) => ({ ...o, [k]: t }));
  };
  const r = parseKg(v.minRefreshPercent) / 100;
  if (!lab.has('lead')) {
    return (
      <Text variant="caption" color="inkMuted" testID="policy-readonly">
        {`Fill at most ${policy.maxMeanAgeBuilds} builds old on average, at least ${Math.round(policy.minRefreshRatio * 100)} % fresh; melt-flow at least ${policy.minMvrCm3Per10Min ?? '–'} cm³/10 min; reorder at ${policy.reorderLevelKg} kg with ${policy.leadTimeDays} days' lead time. Leads change these.`}
      </Text>
    );
  }
  return (
    <View style={styles.form} testID="policy-form">
      <View style={styles.pair}>
        <Half><Field label="Largest mean age of a fill" unit="builds" value={v.maxMeanAgeBuilds} onChangeText={set('maxMeanAgeBuilds')} keyboardType="decimal-pad" error={fieldError(save.error, 'maxMeanAgeBuilds')} testID="policy-age" mono /></Half>
        <Half>
          <Field
            label="Smallest fresh share"
            unit="%"
            value={v.minRefreshPercent}
            onChangeText={set('minRefreshPercent')}
            keyboardType="decimal-pad"
            error={fieldError(save.error, 'minRefreshRatio')}
            hint={r > 0 && r <= 1 ? `Held steady, a fill settles at (1 − r)/r = ${steadyStateFillAge(r).toFixed(1)} builds old.` : undefined}
            testID="policy-refresh"
            mono
          />
        </Half>
        <Half><Field label="Lowest melt-flow (MVR)" unit="cm³/10 min" value={v.minMvr} onChangeText={set('minMvr')} keyboardType="decimal-pad" placeholder="none" error={fieldError(save.error, 'minMvrCm3Per10Min')} testID="policy-mvr" mono /></Half>
        <Half><Field label="Reorder level (fresh)" unit="kg" value={v.reorderLevelKg} onChangeText={set('reorderLevelKg')} keyboardType="decimal-pad" error={fieldError(save.error, 'reorderLevelKg')} testID="policy-reorder" mono /></Half>
        <Half><Field label="Lead time" unit="days" value={v.leadTimeDays} onChangeText={set('leadTimeDays')} keyboardType="number-pad" error={fieldError(save.error, 'leadTimeDays')} testID="policy-lead" mono /></Half>
      </View>
      {save.error && !(isApiError(save.error) && save.error.field) ? <Notice tone="danger">{save.error.message}</Notice> : null}
      {saved ? <Notice tone="success">Saved.</Notice> : null}
      <Button
        label="Save the rules"
        variant="secondary"
        loading={save.isPending}
        testID="policy-save"
        onPress={() =>
          save.mutate(
            {
              maxMeanAgeBuilds: parseKg(v.maxMeanAgeBuilds),
              minRefreshRatio: r,
              minMvrCm3Per10Min: v.minMvr.trim() === '' ? null : parseKg(v.minMvr),
              reorderLevelKg: parseKg(v.reorderLevelKg),
              leadTimeDays: parseKg(v.leadTimeDays),
            },
            { onSuccess: () => setSaved(true) },
          )
        }
      />
    </View>
  );
}

const Half = ({ children }: { children: React.ReactNode }) => <View style={styles.half}>{children}</View>;

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  pair: { flexDirection: 'row', gap: spacing.md, flexWrap: 'wrap' },
  half: { flexGrow: 1, flexBasis: 160 },
});
