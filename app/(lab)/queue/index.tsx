import { useLocalSearchParams } from 'expo-router';
import { QueueScreen } from '@/components/queue/QueueScreen';

export default function QueueRoute() {
  const { machine } = useLocalSearchParams<{ machine?: string }>();
  return <QueueScreen machineId={machine ? String(machine) : undefined} />;
}
