import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { spacing } from '../theme';
import { Button } from './Button';
import { Text } from './Text';

export type ConfirmActionProps = {
  label: string;
  /** The question asked before acting, e.g. "Remove Ada from the lab?". */
  question: string;
  confirmLabel?: string;
  onConfirm: () => void;
  loading?: boolean;
  testID?: string;
  size?: 'sm' | 'md';
};

/**
 * A destructive action that asks in place before it acts: works the same on
 * every platform, with no modal to dismiss.
 */
export function ConfirmAction({ label, question, confirmLabel = label, onConfirm, loading, testID, size = 'sm' }: ConfirmActionProps) {
  const [asking, setAsking] = useState(false);
  if (!asking) {
    return <Button label={label} variant="secondary" size={size} onPress={() => setAsking(true)} testID={testID} />;
  }
  return (
    <View style={styles.ask}>
      <Text variant="label" color="danger">
        {question}
      </Text>
      <View style={styles.buttons}>
        <Button
          label={confirmLabel}
          variant="danger"
          size={size}
          loading={loading}
          onPress={onConfirm}
          testID={testID ? `${testID}-confirm` : undefined}
        />
        <Button label="Keep" variant="ghost" size={size} onPress={() => setAsking(false)} testID={testID ? `${testID}-cancel` : undefined} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  ask: { gap: spacing.xs },
  buttons: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' },
});
