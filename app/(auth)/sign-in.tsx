import { SignInForm } from '@/components/auth/SignInForm';

export default function SignInRoute() {
  return <SignInForm />;
}
