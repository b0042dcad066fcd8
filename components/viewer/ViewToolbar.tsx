import { Pressable, StyleSheet, Text, View, type StyleProp, type ViewStyle } from 'react-native';
import { colors, radius, spacing, touchTarget, type } from '../theme';
import type { FrameName, ViewName } from './math';

const VIEWS: { view: ViewName; label: string; hint: string }[] = [
  { view: 'fit', label: 'Fit', hint: 'Three-quarter view of what is framed' },
  { view: 'top', label: 'Top', hint: 'Look down the build direction' },
  { view: 'front', label: 'Front', hint: 'Look at the build from the front' },
  { view: 'side', label: 'Side', hint: 'Look at the build from the right' },
];

const FRAMES: { frame: FrameName; label: string; hint: string }[] = [
  { frame: 'parts', label: 'Parts', hint: 'Frame the placed parts' },
  { frame: 'chamber', label: 'Chamber', hint: 'Frame the whole chamber' },
];

type PressState = { pressed: boolean; hovered?: boolean; focused?: boolean };

/** Camera view buttons laid over the 3D view: what to frame (the parts or the chamber), then the view direction. */
export function ViewToolbar({
  onView,
  frame,
  onFrame,
  style,
}: {
  onView: (view: ViewName) => void;
  frame?: FrameName;
  onFrame?: (frame: FrameName) => void;
  style?: StyleProp<ViewStyle>;
}) {
  return (
    <View style={[styles.bar, style]} accessibilityRole="toolbar" accessibilityLabel="Camera views">
      {frame && onFrame ? (
        <View style={styles.group} accessibilityRole="radiogroup" accessibilityLabel="Frame">
          {FRAMES.map((f) => {
            const on = frame === f.frame;
            return (
              <Pressable
                key={f.frame}
                onPress={() => onFrame(f.frame)}
                accessibilityRole="radio"
                accessibilityState={{ checked: on }}
                aria-checked={on}
                accessibilityLabel={f.label}
                accessibilityHint={f.hint}
                testID={`view-${f.frame}`}
                style={({ pressed, hovered, focused }: PressState) => [
                  styles.button,
                  (hovered || focused) && styles.buttonHover,
                  pressed && styles.buttonPressed,
                  on && styles.buttonOn,
                ]}
              >
                <Text style={[styles.label, on && styles.labelOn]}>{f.label}</Text>
              </Pressable>
            );
          })}
        </View>
      ) : null}
      {VIEWS.map(({ view, label, hint }) => (
        <Pressable
          key={view}
          onPress={() => onView(view)}
          accessibilityRole="button"
          accessibilityLabel={`${label} view`}
          accessibilityHint={hint}
          testID={`view-${view}`}
          style={({ pressed, hovered, focused }: PressState) => [
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
    flexWrap: 'wrap',
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
  buttonOn: { backgroundColor: colors.graphite },
  group: { flexDirection: 'row', gap: spacing.xxs, paddingRight: spacing.xxs, marginRight: spacing.xxs, borderRightWidth: 1, borderRightColor: colors.line },
  label: { ...type.label, color: colors.ink },
  labelOn: { color: colors.surface },
});
