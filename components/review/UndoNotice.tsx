import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { spacing } from '../theme';
import { Button, Notice, Text } from '../ui';

const clock = (ms: number) => {
  const s = Math.max(0, Math.ceil(ms / 1000));
  return `${Math.floor(s / 60)}:${String(s % 60).padStart(2, '0')}`;
};

/**
 * What was just done, with an undo button that counts down to the end of the
 * server's window (`until`, from the server's answer) and then goes away; the
 * server refuses an undo after it whatever this shows.
 */
export function UndoNotice({
  title,
  children,
  until,
  undoLabel,
  onUndo,
  pending,
  error,
  testID,
}: {
  title: string;
  children?: React.ReactNode;
  until: string | null | undefined;
  undoLabel: string;
  onUndo: () => void;
  pending: boolean;
  error?: string | null;
  testID: string;
}) {
  const end = until ? Date.parse(until) : NaN;
  const [now, setNow] = useState(() => Date.now());
  const open = Number.isFinite(end) && now < end;
  useEffect(() => {
    if (!open) return;
    const t = setInterval(() => setNow(Date.now()), 1000);
    return () => clearInterval(t);
  }, [open]);
  return (
    <Notice tone="success" title={title} testID={testID}>
      {typeof children === 'string' ? <Text variant="body">{children}</Text> : children}
      {open ? (
        <View style={styles.row}>
          <Button label={`${undoLabel} (${clock(end - now)})`} variant="secondary" size="sm" onPress={onUndo} loading={pending} testID={`${testID}-undo`} />
          <Text variant="caption" color="inkMuted">
            Possible for {clock(end - now)} more.
          </Text>
        </View>
      ) : null}
      {error ? (
        <Text variant="label" color="danger" testID={`${testID}-undo-error`}>
          {error}
        </Text>
      ) : null}
    </Notice>
  );
}

const styles = StyleSheet.create({ row: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: spacing.sm } });
