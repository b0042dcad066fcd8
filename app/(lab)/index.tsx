import { HomeScreen } from '@/components/home/HomeScreen';

export default function HomeRoute() {
  return <HomeScreen />;
}
