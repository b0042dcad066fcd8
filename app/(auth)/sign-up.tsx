import { SignUpForm } from '@/components/auth/SignUpForm';

export default function SignUpRoute() {
  return <SignUpForm />;
}
