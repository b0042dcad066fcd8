import { PowderScreen } from '@/components/powder/PowderScreen';

export default function PowderRoute() {
  return <PowderScreen />;
}
