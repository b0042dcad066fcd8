import { StyleSheet, View } from 'react-native';
import { useMeQuery, useSignOutMutation } from '../queries/me';
import { colors, spacing } from '../theme';
import { Button, ErrorState, LoadingState, Notice, Text } from '../ui';
import { Wordmark } from './Wordmark';

export function FullScreenLoading() {
  return (
    <View style={styles.center}>
      <Wordmark size="lg" />
      <LoadingState label="Opening Sinterstack…" />
    </View>
  );
}

export function FullScreenError({ error, onRetry }: { error: { message: string }; onRetry: () => void }) {
  return (
    <View style={styles.center}>
      <View style={styles.column}>
        <Wordmark size="lg" />
        <ErrorState error={error} onRetry={onRetry} />
      </View>
    </View>
  );
}

/** A user whose last lab removed them: nothing to show but the way out. */
export function NoLab() {
  const { data: me } = useMeQuery();
  const signOut = useSignOutMutation();
  return (
    <View style={styles.center} testID="no-lab">
      <View style={styles.column}>
        <Wordmark size="lg" />
        <Notice tone="caution" title="You are not a member of any lab">
          <Text variant="body">{`${me?.user.email ?? 'This account'} belongs to no lab right now. Ask a lab's lead for an invite, or create a new lab.`}</Text>
        </Notice>
        <Button label="Sign out" variant="secondary" onPress={() => signOut.mutate()} loading={signOut.isPending} testID="sign-out" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  center: { flex: 1, alignItems: 'center', justifyContent: 'center', backgroundColor: colors.powder, padding: spacing.xl, gap: spacing.lg },
  column: { width: '100%', maxWidth: 440, gap: spacing.lg },
});
