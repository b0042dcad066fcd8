import { Redirect } from 'expo-router';

export default function SettingsIndexRoute() {
  return <Redirect href="/settings/members" />;
}
