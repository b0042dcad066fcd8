import { MembersSection } from '@/components/settings/MembersSection';

export default function MembersRoute() {
  return <MembersSection />;
}
