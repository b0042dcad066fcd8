import { useLocalSearchParams } from 'expo-router';
import { InviteAccept } from '@/components/auth/InviteAccept';

export default function InviteRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  return <InviteAccept token={String(token ?? '')} />;
}
