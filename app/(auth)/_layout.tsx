import { Redirect, Slot, usePathname } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { FullScreenError, FullScreenLoading } from '@/components/lab/GateStates';
import { useMeQuery } from '@/components/queries/me';

/**
 * Signed-out pages. A signed-in user goes home, except on an invite link (it
 * may add a lab) or a password reset link (it ends every session anyway).
 */
export default function AuthLayout() {
  const me = useMeQuery();
  // The navigator stays mounted while the session loads, so the path (and an invite token in it) is known.
  const path = usePathname();
  const onInvite = path.startsWith('/invite/') || path.startsWith('/reset/');

  if (me.data && !onInvite) return <Redirect href="/" />;
  if (me.isError && !onInvite) return <FullScreenError error={me.error} onRetry={() => me.refetch()} />;
  return (
    <View style={styles.fill}>
      <Slot />
      {me.isPending ? (
        <View style={StyleSheet.absoluteFill}>
          <FullScreenLoading />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({ fill: { flex: 1 } });
