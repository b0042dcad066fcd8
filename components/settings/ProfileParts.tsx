import { Link, type Href } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { colors, spacing } from '../theme';
import { Card, ConfirmAction, Icon, Notice, Text } from '../ui';

export function ProfileBack({ href, label }: { href: Href; label: string }) {
  return (
    <Link href={href} accessibilityRole="link" testID="profile-back">
      <View style={styles.back}>
        <View style={{ transform: [{ rotate: '180deg' }] }}>
          <Icon name="chevron" size={16} color={colors.ember} />
        </View>
        <Text variant="label" color="ember">
          {label}
        </Text>
      </View>
    </Link>
  );
}

export function DeleteProfile({
  what,
  testID,
  pending,
  error,
  saved,
  onDelete,
}: {
  what: string;
  testID: string;
  pending: boolean;
  error: Error | null;
  saved: boolean;
  onDelete: () => void;
}) {
  return (
    <View style={styles.foot}>
      {saved ? (
        <Notice tone="success" testID={`${testID.replace('-delete', '')}-saved`}>
          Saved.
        </Notice>
      ) : null}
      <Card title="Delete" subtitle="Removes it from the lab. The server refuses while something still uses it.">
        {error ? <Notice tone="danger">{error.message}</Notice> : null}
        <ConfirmAction label="Delete" question={`Delete the ${what}?`} onConfirm={onDelete} loading={pending} testID={testID} size="md" />
      </Card>
    </View>
  );
}

const styles = StyleSheet.create({
  back: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, minHeight: 32 },
  foot: { gap: spacing.lg },
});
