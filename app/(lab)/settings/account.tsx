import { AccountSection } from '@/components/settings/AccountSection';

export default function AccountRoute() {
  return <AccountSection />;
}
