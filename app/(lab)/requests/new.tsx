import { useLocalSearchParams } from 'expo-router';
import { NewRequest } from '@/components/requests/RequestPages';

/** /requests/new, or /requests/new?partId=... from a part's page: the form starts with that part on a line. */
export default function NewRequestRoute() {
  const { partId } = useLocalSearchParams<{ partId?: string }>();
  return <NewRequest partId={typeof partId === 'string' && partId ? partId : undefined} />;
}
