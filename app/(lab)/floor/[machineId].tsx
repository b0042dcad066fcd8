import { useLocalSearchParams } from 'expo-router';
import { MachineFloor } from '@/components/floor/FloorScreens';

export default function MachineFloorRoute() {
  const { machineId } = useLocalSearchParams<{ machineId: string }>();
  return <MachineFloor key={String(machineId)} machineId={String(machineId)} />;
}
