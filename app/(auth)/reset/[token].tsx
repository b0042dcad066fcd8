import { useLocalSearchParams } from 'expo-router';
import { ResetPasswordForm } from '@/components/auth/ResetPasswordForm';

export default function ResetRoute() {
  const { token } = useLocalSearchParams<{ token: string }>();
  return <ResetPasswordForm token={String(token ?? '')} />;
}
