import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useReturnToDraftMutation } from '../queries/review';
import { spacing } from '../theme';
import { Button, Field, Text } from '../ui';
import { returnToDraftSchema } from '../../shared/schemas/review';
import type { PlanView } from '../../shared/schemas/plans';

/**
 * An approved or queued plan back to draft, for planners and leads, before
 * printing starts: asks for the reason first (kept in the plan's history and
 * the audit log). Renders nothing where the server would refuse it.
 */
export function ReturnToDraft({ plan }: { plan: Pick<PlanView, 'id' | 'status' | 'machine'> }) {
  const lab = useLab();
  const back = useReturnToDraftMutation(lab.id, plan.id, plan.machine.id);
  const [asking, setAsking] = useState(false);
  const [reason, setReason] = useState('');
  const [error, setError] = useState<string | null>(null);
  if (!(plan.status === 'approved' || plan.status === 'queued') || !(lab.has('planner') || lab.isLead)) return null;
  if (!asking) {
    return <Button label="Return to draft" variant="secondary" size="sm" onPress={() => setAsking(true)} testID="return-to-draft" />;
  }
  const submit = () => {
    const parsed = returnToDraftSchema.safeParse({ reason });
    if (!parsed.success) return setError(`The reason ${parsed.error.issues[0].message}.`);
    setError(null);
    back.mutate(parsed.data, { onError: (e) => setError(e.message) });
  };
  return (
    <View style={styles.box} testID="return-to-draft-form">
      <Text variant="label" color="inkMuted">
        The plan leaves the queue of {plan.machine.name} and can be changed again; it needs a new review before it is printed.
      </Text>
      <Field
        label="Why does it go back to draft?"
        hint="Kept in the plan's history and the lab's audit log."
        value={reason}
        onChangeText={(t) => {
          setReason(t);
          setError(null);
        }}
        error={error}
        multiline
        style={{ minHeight: 72, paddingTop: spacing.sm, textAlignVertical: 'top' }}
        testID="return-to-draft-reason"
      />
      <View style={styles.buttons}>
        <Button label="Return to draft" variant="danger" size="sm" onPress={submit} loading={back.isPending} testID="return-to-draft-confirm" />
        <Button label="Keep it" variant="ghost" size="sm" onPress={() => setAsking(false)} testID="return-to-draft-keep" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.sm },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
