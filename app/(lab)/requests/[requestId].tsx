import { useLocalSearchParams } from 'expo-router';
import { RequestDetail } from '@/components/requests/RequestPages';

export default function RequestRoute() {
  const { requestId } = useLocalSearchParams<{ requestId: string }>();
  return <RequestDetail requestId={String(requestId)} />;
}
