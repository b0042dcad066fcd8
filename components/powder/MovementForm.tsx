import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { useMovementMutation, useReceiveLotMutation } from '../queries/powder';
import { spacing } from '../theme';
import { Button, Field, Notice, Text, ToggleChip } from '../ui';
import type { LotView } from '../../shared/schemas/powder';
import { kgText, parseKg } from './format';

type Mode = 'receive' | 'count' | 'discard';
const todayIso = () => new Date().toISOString().slice(0, 10);

function fieldError(e: unknown, field: string): string | null {
  return isApiError(e) && e.field === field ? e.message : null;
}

/** Receiving a delivery as a lot, counting what is on the shelf, or throwing powder away: each one movement. */
export function MovementForm({ materialId, lots }: { materialId: string; lots: LotView[] }) {
  const lab = useLab();
  const [mode, setMode] = useState<Mode>('receive');
  const [code, setCode] = useState('');
  const [makerLot, setMakerLot] = useState('');
  const [kg, setKg] = useState('');
  const [receivedOn, setReceivedOn] = useState(todayIso());
  const [expiresOn, setExpiresOn] = useState('');
  const [target, setTarget] = useState<string | null>(null); // lot id, or null for the reused powder
  const [reason, setReason] = useState('');
  const [done, setDone] = useState<string | null>(null);
  const receive = useReceiveLotMutation(lab.id);
  const move = useMovementMutation(lab.id);
  const m = mode === 'receive' ? receive : move;
  const err = m.error;
  const amount = parseKg(kg);
  const open = lots.filter((l) => l.onHandKg > 0);

  const reset = (message: string) => {
    setDone(message);
    setKg('');
    setReason('');
    setCode('');
    setMakerLot('');
    setExpiresOn('');
  };
  const submit = () => {
    setDone(null);
    if (mode === 'receive') {
      receive.mutate(
        { materialId, code: code.trim(), kg: amount, receivedOn, makerLot: makerLot.trim() || undefined, expiresOn: expiresOn.trim() || null },
        { onSuccess: (lot) => reset(`Lot ${lot.code} received: ${kgText(lot.onHandKg)}.`) },
      );
    } else if (mode === 'count') {
      move.mutate({ kind: 'adjusted', materialId, lotId: target, countedKg: amount, reason: reason.trim() }, { onSuccess: (mv) => reset(`Count recorded: ${mv.deltaKg >= 0 ? '+' : ''}${mv.deltaKg.toFixed(2)} kg against the book.`) });
    } else {
      move.mutate({ kind: 'discarded', materialId, lotId: target, kg: amount, reason: reason.trim() }, { onSuccess: () => reset('Discard recorded.') });
    }
  };

  return (
    <View style={styles.form} testID="movement-form">
      <View style={styles.modes}>
        {(
          [
            ['receive', 'Receive a lot'],
            ['count', 'Count'],
            ['discard', 'Discard'],
          ] as const
        ).map(([key, label]) => (
          <ToggleChip key={key} label={label} value={mode === key} onChange={() => { setMode(key); setDone(null); m.reset(); }} testID={`movement-mode-${key}`} />
        ))}
      </View>
      {mode === 'receive' ? (
        <>
          <Field label="Lot code (the lab's own)" value={code} onChangeText={setCode} autoCapitalize="characters" error={fieldError(err, 'code')} testID="lot-code" />
          <Field label="Maker's lot (as printed on the bag)" value={makerLot} onChangeText={setMakerLot} error={fieldError(err, 'makerLot')} testID="lot-maker" />
          <Field label="Received" unit="kg" value={kg} onChangeText={setKg} keyboardType="decimal-pad" error={fieldError(err, 'kg')} testID="lot-kg" mono />
          <View style={styles.pair}>
            <View style={styles.half}>
              <Field label="Received on" value={receivedOn} onChangeText={setReceivedOn} placeholder="YYYY-MM-DD" error={fieldError(err, 'receivedOn')} testID="lot-received-on" mono />
            </View>
            <View style={styles.half}>
              <Field label="Expires on (optional)" value={expiresOn} onChangeText={setExpiresOn} placeholder="YYYY-MM-DD" error={fieldError(err, 'expiresOn')} testID="lot-expires-on" mono />
            </View>
          </View>
        </>
      ) : (
        <>
          <Text variant="label" color="inkMuted">
            {mode === 'count' ? 'What did you count?' : 'Discard from'}
          </Text>
          <View style={styles.modes}>
            <ToggleChip label="Reused powder" value={target === null} onChange={() => setTarget(null)} testID="target-reused" />
            {open.map((l) => (
              <ToggleChip key={l.id} label={`Lot ${l.code}`} value={target === l.id} onChange={() => setTarget(l.id)} testID={`target-lot-${l.code}`} />
            ))}
          </View>
          <Field
            label={mode === 'count' ? 'Counted on the shelf' : 'Discarded'}
            unit="kg"
            value={kg}
            onChangeText={setKg}
            keyboardType="decimal-pad"
            error={fieldError(err, mode === 'count' ? 'countedKg' : 'kg')}
            hint={mode === 'count' ? 'Weigh what is there; the difference from the book is recorded, with your name and reason.' : undefined}
            testID="movement-kg"
            mono
          />
          <Field label="Why" value={reason} onChangeText={setReason} error={fieldError(err, 'reason')} testID="movement-reason" placeholder={mode === 'count' ? 'e.g. monthly count' : 'e.g. bag torn, wet, yellowed'} />
        </>
      )}
      {err && !['code', 'kg', 'countedKg', 'reason', 'receivedOn', 'expiresOn', 'makerLot'].includes((isApiError(err) && err.field) || '') ? (
        <Notice tone="danger" title="Not recorded" testID="movement-error">
          {err.message}
        </Notice>
      ) : null}
      {done ? (
        <Notice tone="success" testID="movement-done">
          {done}
        </Notice>
      ) : null}
      <Button
        label={mode === 'receive' ? 'Receive the lot' : mode === 'count' ? 'Record the count' : 'Record the discard'}
        onPress={submit}
        loading={m.isPending}
        disabled={!Number.isFinite(amount) || (mode === 'receive' ? code.trim() === '' : reason.trim() === '')}
        testID="movement-submit"
      />
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  modes: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  pair: { flexDirection: 'row', gap: spacing.md, flexWrap: 'wrap' },
  half: { flexGrow: 1, flexBasis: 140 },
});
