import { AuditSection } from '@/components/settings/AuditSection';

export default function AuditRoute() {
  return <AuditSection />;
}
