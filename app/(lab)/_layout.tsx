import { Redirect, Slot } from 'expo-router';
import { FullScreenError, FullScreenLoading, NoLab } from '@/components/lab/GateStates';
import { LabShell } from '@/components/lab/LabShell';
import { useMeQuery } from '@/components/queries/me';

/** Signed-in pages: the auth gate, then the lab's navigation frame. */
export default function LabLayout() {
  const me = useMeQuery();
  if (me.isPending) return <FullScreenLoading />;
  if (me.isError) return <FullScreenError error={me.error} onRetry={() => me.refetch()} />;
  if (!me.data) return <Redirect href="/sign-in" />;
  if (me.data.labs.length === 0) return <NoLab />;
  return (
    <LabShell>
      <Slot />
    </LabShell>
  );
}
