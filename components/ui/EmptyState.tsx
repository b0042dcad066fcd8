import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Text } from './Text';

export type EmptyStateProps = {
  title: string;
  body: string;
  /** Who fills this place, e.g. "Filled by designers". */
  who?: string;
  action?: React.ReactNode;
  testID?: string;
};

/** A place that has nothing yet: says what will appear here and who puts it there. */
export function EmptyState({ title, body, who, action, testID }: EmptyStateProps) {
  return (
    <View style={styles.box} testID={testID}>
      <View style={styles.mark} accessibilityElementsHidden importantForAccessibility="no">
        <View style={[styles.layer, { width: 28 }]} />
        <View style={[styles.layer, { width: 36 }]} />
        <View style={[styles.layer, { width: 22 }]} />
      </View>
      <View style={styles.text}>
        <Text variant="bodyStrong">{title}</Text>
        <Text variant="body" color="inkMuted">
          {body}
        </Text>
        {who ? (
          <Text variant="caption" color="teal">
            {who}
          </Text>
        ) : null}
      </View>
      {action}
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    borderWidth: 1,
    borderStyle: 'dashed',
    borderColor: colors.lineStrong,
    borderRadius: radius.lg,
    padding: spacing.lg,
    gap: spacing.md,
    backgroundColor: colors.powder,
  },
  mark: { gap: 3 },
  layer: { height: 4, borderRadius: 2, backgroundColor: colors.lineStrong },
  text: { gap: spacing.xs },
});
