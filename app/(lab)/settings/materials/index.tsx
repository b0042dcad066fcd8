import { MaterialsSection } from '@/components/settings/MaterialsSection';

export default function MaterialsRoute() {
  return <MaterialsSection />;
}
