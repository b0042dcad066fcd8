import { NewMaterial } from '@/components/settings/MaterialsSection';

export default function NewMaterialRoute() {
  return <NewMaterial />;
}
