import { LabRulesSection } from '@/components/settings/LabRulesSection';

export default function RulesRoute() {
  return <LabRulesSection />;
}
