import { Redirect, Slot, useSegments } from 'expo-router';
import { FullScreenError, FullScreenLoading } from '@/components/lab/GateStates';
import { useMeQuery } from '@/components/queries/me';

/** Signed-out pages. A signed-in user goes home, except on an invite link (it may add a lab). */
export default function AuthLayout() {
  const me = useMeQuery();
  const segments = useSegments() as string[];
  const onInvite = segments.includes('invite');

  if (me.isPending) return <FullScreenLoading />;
  if (me.isError && !onInvite) return <FullScreenError error={me.error} onRetry={() => me.refetch()} />;
  if (me.data && !onInvite) return <Redirect href="/" />;
  return <Slot />;
}
