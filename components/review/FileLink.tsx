import { Linking, Pressable, StyleSheet } from 'react-native';
import { colors, radius, spacing, touchTarget } from '../theme';
import { Text } from '../ui';

export type FileLinkProps = { href: string; label: string; hint?: string; testID?: string };

/** A download of a file the server makes (build sheet, build file): the system opens it. */
export function FileLink({ href, label, hint, testID }: FileLinkProps) {
  return (
    <Pressable
      testID={testID}
      accessibilityRole="link"
      accessibilityHint={hint}
      onPress={() => void Linking.openURL(href)}
      style={({ pressed }) => [styles.link, pressed && styles.pressed]}
    >
      <Text variant="bodyStrong" color="emberPressed">
        {label}
      </Text>
      {hint ? (
        <Text variant="caption" color="inkMuted">
          {hint}
        </Text>
      ) : null}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  link: {
    minHeight: touchTarget,
    justifyContent: 'center',
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.xs,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.lineStrong,
    backgroundColor: colors.surface,
  },
  pressed: { backgroundColor: colors.powderDeep },
});
