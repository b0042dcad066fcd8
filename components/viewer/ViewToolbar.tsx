import { Pressable, StyleSheet, Text, View, type StyleProp, type ViewStyle } from 'react-native';
import { colors, radius, spacing, touchTarget, type } from '../theme';
import type { ViewName } from './math';

const VIEWS: { view: ViewName; label: string; hint: string }[] = [
  { view: 'fit', label: 'Fit', hint: 'Show the whole chamber' },
  { view: 'top', label: 'Top', hint: 'Look down the build direction' },
  { view: 'front', label: 'Front', hint: 'Look at the chamber from the front' },
  { view: 'side', label: 'Side', hint: 'Look at the chamber from the right' },
];

/** Camera view buttons laid over the 3D view. */
export function ViewToolbar({ onView, style }: { onView: (view: ViewName) => void; style?: StyleProp<ViewStyle> }) {
  return (
    <View style={[styles.bar, style]} accessibilityRole="toolbar" accessibilityLabel="Camera views">
      {VIEWS.map(({ view, label, hint }) => (
        <Pressable
          key={view}
          onPress={() => onView(view)}
          accessibilityRole="button"
          accessibilityLabel={`${label} view`}
          accessibilityHint={hint}
          testID={`view-${view}`}
          style={({ pressed, hovered, focused }: { pressed: boolean; hovered?: boolean; focused?: boolean }) => [
            styles.button,
            (hovered || focused) && styles.buttonHover,
            pressed && styles.buttonPressed,
          ]}
        >
          <Text style={styles.label}>{label}</Text>
        </Pressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  bar: {
    flexDirection: 'row',
    gap: spacing.xxs,
    padding: spacing.xxs,
    borderRadius: radius.md,
    backgroundColor: 'rgba(255, 253, 249, 0.92)',
    borderWidth: 1,
    borderColor: colors.line,
  },
  button: {
    minWidth: touchTarget,
    minHeight: 36,
    paddingHorizontal: spacing.md,
    borderRadius: radius.sm,
    alignItems: 'center',
    justifyContent: 'center',
  },
  buttonHover: { backgroundColor: colors.powderDeep },
  buttonPressed: { backgroundColor: colors.emberSoft },
  label: { ...type.label, color: colors.ink },
});
