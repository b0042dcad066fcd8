import { FloorPicker } from '@/components/floor/FloorScreens';

export default function FloorRoute() {
  return <FloorPicker />;
}
