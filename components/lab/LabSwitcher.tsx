import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useMeQuery } from '../queries/me';
import { colors, radius, spacing } from '../theme';
import { Icon, Text } from '../ui';
import { chooseLab, useCurrentLab } from './useCurrentLab';

/**
 * The current lab's name; with several labs it opens a list to switch.
 * `tone` matches the surface it sits on (the dark rail or the light top bar).
 */
export function LabSwitcher({ tone }: { tone: 'dark' | 'light' }) {
  const { data: me } = useMeQuery();
  const lab = useCurrentLab();
  const [open, setOpen] = useState(false);
  const labs = me?.labs ?? [];
  if (!lab) return null;
  const dark = tone === 'dark';
  const fg = dark ? colors.onGraphite : colors.ink;
  const muted = dark ? colors.onGraphiteMuted : colors.inkMuted;

  if (labs.length < 2) {
    return (
      <View style={styles.single} testID="lab-name">
        <Text variant="overline" style={{ color: muted }}>
          Lab
        </Text>
        <Text variant="bodyStrong" style={{ color: fg }} numberOfLines={dark ? 2 : 1}>
          {lab.name}
        </Text>
      </View>
    );
  }

  return (
    <View style={styles.wrap}>
      <Pressable
        testID="lab-switcher"
        accessibilityRole="button"
        accessibilityLabel={`Lab: ${lab.name}. Switch lab`}
        accessibilityState={{ expanded: open }}
        onPress={() => setOpen((o) => !o)}
        style={({ pressed }) => [styles.trigger, dark ? styles.triggerDark : styles.triggerLight, pressed && { opacity: 0.8 }]}
      >
        <View style={styles.single}>
          <Text variant="overline" style={{ color: muted }}>
            {`Lab · ${labs.length}`}
          </Text>
          <Text variant="bodyStrong" style={{ color: fg }} numberOfLines={dark ? 2 : 1}>
            {lab.name}
          </Text>
        </View>
        <View style={{ transform: [{ rotate: open ? '-90deg' : '90deg' }] }}>
          <Icon name="chevron" size={18} color={muted} />
        </View>
      </Pressable>
      {open ? (
        <View style={[styles.menu, dark ? styles.menuDark : styles.menuLight]} accessibilityRole="menu">
          {labs.map((l) => {
            const current = l.id === lab.id;
            return (
              <Pressable
                key={l.id}
                testID={`lab-option-${l.id}`}
                accessibilityRole="menuitem"
                accessibilityState={{ selected: current }}
                onPress={() => {
                  chooseLab(l.id);
                  setOpen(false);
                }}
                style={({ pressed }) => [styles.option, (pressed || current) && { backgroundColor: dark ? colors.graphiteRaised : colors.powderDeep }]}
              >
                <View style={[styles.dot, { backgroundColor: current ? colors.ember : 'transparent' }]} />
                <Text variant="body" style={{ color: fg, flexShrink: 1 }} numberOfLines={1}>
                  {l.name}
                </Text>
              </Pressable>
            );
          })}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.xs, zIndex: 10 },
  single: { flexShrink: 1, gap: 1, minWidth: 0 },
  trigger: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.sm,
    minHeight: 48,
    paddingHorizontal: spacing.md,
    borderRadius: radius.md,
    borderWidth: 1,
  },
  triggerDark: { borderColor: colors.graphiteRaised, backgroundColor: colors.graphite },
  triggerLight: { borderColor: colors.line, backgroundColor: colors.surface },
  menu: { borderRadius: radius.md, borderWidth: 1, paddingVertical: spacing.xs },
  menuDark: { backgroundColor: colors.graphite, borderColor: colors.graphiteRaised },
  menuLight: { backgroundColor: colors.surface, borderColor: colors.line },
  option: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, minHeight: 48, paddingHorizontal: spacing.md },
  dot: { width: 8, height: 8, borderRadius: 4 },
});
