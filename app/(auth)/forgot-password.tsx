import { ForgotPasswordForm } from '@/components/auth/ForgotPasswordForm';

export default function ForgotPasswordRoute() {
  return <ForgotPasswordForm />;
}
