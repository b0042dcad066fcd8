import { PartLibrary } from '@/components/parts/PartLibrary';

export default function PartsRoute() {
  return <PartLibrary />;
}
