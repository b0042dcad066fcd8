import { NewMachine } from '@/components/settings/MachinesSection';

export default function NewMachineRoute() {
  return <NewMachine />;
}
