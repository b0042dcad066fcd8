import { InvitesSection } from '@/components/settings/InvitesSection';

export default function InvitesRoute() {
  return <InvitesSection />;
}
