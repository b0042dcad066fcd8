import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { useMeltFlowMutation, useReleaseMutation } from '../queries/powder';
import { spacing } from '../theme';
import { Badge, Button, Field, Figure, Notice, Text } from '../ui';
import { formatDateTime } from '../ui/format';
import type { MeltFlowView } from '../../shared/schemas/powder';
import { parseKg } from './format';

const fieldError = (e: unknown, f: string) => (isApiError(e) && e.field === f ? e.message : null);

/**
 * Melt volume-rate checks of the reused powder (the method is ISO 1133-1's):
 * a value under the material's threshold blocks reuse until a lead releases
 * it with a reason.
 */
export function MeltFlowPanel({ materialId, checks, thresholdCm3Per10Min }: { materialId: string; checks: MeltFlowView[]; thresholdCm3Per10Min: number | null }) {
  const lab = useLab();
  const canRecord = lab.has('operator') || lab.has('lead');
  const add = useMeltFlowMutation(lab.id);
  const [mvr, setMvr] = useState('');
  const [temp, setTemp] = useState('');
  const [load, setLoad] = useState('');
  const value = parseKg(mvr);
  return (
    <View style={styles.box} testID="melt-flow">
      <Text variant="caption" color="inkMuted">
        {thresholdCm3Per10Min
          ? `Reused powder passes at ${thresholdCm3Per10Min} cm³/10 min or more (this material's threshold). Aged powder flows less when molten.`
          : 'No threshold is set for this material yet: checks are recorded but never block reuse. A lead sets it under Rules below.'}
      </Text>
      {checks.length === 0 ? <Text color="inkMuted">No melt-flow check recorded yet.</Text> : null}
      {checks.slice(0, 6).map((c) => (
        <CheckRow key={c.id} c={c} />
      ))}
      {canRecord ? (
        <View style={styles.form}>
          <Field label="Melt volume-rate (MVR)" unit="cm³/10 min" value={mvr} onChangeText={setMvr} keyboardType="decimal-pad" error={fieldError(add.error, 'mvrCm3Per10Min')} testID="mvr-value" mono />
          <View style={styles.pair}>
            <View style={styles.half}>
              <Field label="Test temperature" unit="°C" value={temp} onChangeText={setTemp} keyboardType="decimal-pad" error={fieldError(add.error, 'testTempC')} testID="mvr-temp" mono />
            </View>
            <View style={styles.half}>
              <Field label="Test load" unit="kg" value={load} onChangeText={setLoad} keyboardType="decimal-pad" error={fieldError(add.error, 'testLoadKg')} testID="mvr-load" mono />
            </View>
          </View>
          <Button
            label="Record the check"
            variant="secondary"
            disabled={!Number.isFinite(value)}
            loading={add.isPending}
            testID="mvr-submit"
            onPress={() =>
              add.mutate(
                {
                  materialId,
                  mvrCm3Per10Min: value,
                  ...(temp.trim() ? { testTempC: parseKg(temp) } : {}),
                  ...(load.trim() ? { testLoadKg: parseKg(load) } : {}),
                },
                { onSuccess: () => { setMvr(''); } },
              )
            }
          />
        </View>
      ) : null}
    </View>
  );
}

function CheckRow({ c }: { c: MeltFlowView }) {
  const lab = useLab();
  const release = useReleaseMutation(lab.id);
  const [reason, setReason] = useState('');
  const blocking = !c.passed && !c.releasedAt;
  return (
    <View style={styles.check} testID={`mvr-check-${c.id}`}>
      <View style={styles.line}>
        <Figure variant="figure">{`${c.mvrCm3Per10Min} cm³/10 min`}</Figure>
        <Badge tone={c.passed ? 'teal' : c.releasedAt ? 'amber' : 'danger'} label={c.passed ? 'Passed' : c.releasedAt ? 'Released' : 'Failed: reuse blocked'} />
        <Text variant="caption" color="inkMuted">
          {formatDateTime(c.measuredAt)}
          {c.measuredBy ? ` · ${c.measuredBy.name}` : ''}
          {c.testTempC ? ` · ${c.testTempC} °C` : ''}
          {c.testLoadKg ? ` / ${c.testLoadKg} kg` : ''}
        </Text>
      </View>
      {c.releasedAt ? (
        <Text variant="caption" color="inkMuted">
          Released by {c.releasedBy?.name ?? 'a former member'}: {c.releaseReason}
        </Text>
      ) : null}
      {blocking && lab.has('lead') ? (
        <View style={styles.form}>
          <Field label="Why may it be reused?" value={reason} onChangeText={setReason} error={isApiError(release.error) ? release.error.message : null} testID="mvr-release-reason" />
          <Button label="Release for reuse" variant="danger" size="sm" disabled={reason.trim() === ''} loading={release.isPending} onPress={() => release.mutate({ checkId: c.id, reason: reason.trim() })} testID="mvr-release" />
        </View>
      ) : blocking ? (
        <Notice tone="caution">Only a lead can release this powder for reuse.</Notice>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.md },
  form: { gap: spacing.sm },
  check: { gap: spacing.xs },
  line: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  pair: { flexDirection: 'row', gap: spacing.md, flexWrap: 'wrap' },
  half: { flexGrow: 1, flexBasis: 140 },
});
