import { NewRequest } from '@/components/requests/RequestPages';

export default function NewRequestRoute() {
  return <NewRequest />;
}
