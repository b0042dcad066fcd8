import { useLab } from '@/components/lab/useCurrentLab';
import { EmptyState, Screen } from '@/components/ui';

export default function PartsRoute() {
  const lab = useLab();
  return (
    <Screen title="Parts" subtitle={`The part library of ${lab.name}: each mesh with its measured size, volume and warnings.`} testID="screen-parts">
      <EmptyState
        testID="parts-empty"
        title="No parts yet"
        body="Designers upload STL, OBJ or 3MF files here. Each part is measured on upload (bounding box, volume, surface area, shells, watertightness) and flagged when it is open, thin or too big for every machine of the lab."
        who="Filled by designers; read by planners when they pack builds."
      />
    </Screen>
  );
}
