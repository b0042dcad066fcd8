import { RequestList } from '@/components/requests/RequestList';

export default function RequestsRoute() {
  return <RequestList />;
}
