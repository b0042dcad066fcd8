import { MachinesSection } from '@/components/settings/MachinesSection';

export default function MachinesRoute() {
  return <MachinesSection />;
}
