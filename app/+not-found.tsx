import { Link } from 'expo-router';
import { View } from 'react-native';
import { colors, spacing } from '@/components/theme';
import { Text } from '@/components/ui';

export default function NotFoundRoute() {
  return (
    <View style={{ flex: 1, alignItems: 'center', justifyContent: 'center', gap: spacing.md, backgroundColor: colors.powder, padding: spacing.xl }}>
      <Text variant="title">This page does not exist</Text>
      <Link href="/" testID="not-found-home">
        <Text variant="bodyStrong" color="ember">
          Go to home
        </Text>
      </Link>
    </View>
  );
}
