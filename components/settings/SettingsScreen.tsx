import { usePathname, type Href } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { colors, radius, spacing } from '../theme';
import { LinkPressable, Screen, Text } from '../ui';

const sections: { key: string; label: string; href: Href; path: string }[] = [
  { key: 'members', label: 'Members', href: '/settings/members', path: '/settings/members' },
  { key: 'invites', label: 'Invites', href: '/settings/invites', path: '/settings/invites' },
  { key: 'machines', label: 'Machines', href: '/settings/machines', path: '/settings/machines' },
  { key: 'materials', label: 'Materials', href: '/settings/materials', path: '/settings/materials' },
  { key: 'rules', label: 'Rules', href: '/settings/rules', path: '/settings/rules' },
  { key: 'audit', label: 'Audit log', href: '/settings/audit', path: '/settings/audit' },
  { key: 'account', label: 'Account', href: '/settings/account', path: '/settings/account' },
];

/** A settings page: the section switcher above the section's own title. */
export function SettingsScreen({
  title,
  subtitle,
  actions,
  testID,
  children,
}: {
  title: string;
  subtitle?: string;
  actions?: React.ReactNode;
  testID?: string;
  children: React.ReactNode;
}) {
  return (
    <Screen title={title} subtitle={subtitle} actions={actions} testID={testID} above={<SettingsNav />}>
      {children}
    </Screen>
  );
}

function SettingsNav() {
  const pathname = usePathname();
  const lab = useLab();
  return (
    <View style={styles.wrap}>
      <Text variant="overline" color="inkFaint">
        {`Lab settings · ${lab.name}${lab.isLead ? '' : ' · read only'}`}
      </Text>
      {/* The sections wrap onto a second row on a phone, so every one stays in view. */}
      <View style={styles.bar} role="tablist">
        {sections.map((s) => {
          const active = pathname === s.path || pathname.startsWith(`${s.path}/`);
          return (
            <LinkPressable key={s.key} href={s.href}
                testID={`settings-section-${s.key}`}
                accessibilityRole="tab"
                accessibilityLabel={s.label}
                accessibilityState={{ selected: active }}
                style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
                  styles.chip,
                  (pressed || hovered) && styles.chipHover,
                  active && styles.chipActive,
                ]}
              >
                <Text variant="label" color={active ? 'onGraphite' : 'ink'}>
                  {s.label}
                </Text>
              </LinkPressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  bar: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, paddingVertical: spacing.xxs },
  chip: {
    minHeight: 44,
    paddingHorizontal: spacing.lg,
    borderRadius: radius.pill,
    borderWidth: 1,
    borderColor: colors.lineStrong,
    backgroundColor: colors.surface,
    justifyContent: 'center',
  },
  chipHover: { borderColor: colors.ember },
  chipActive: { backgroundColor: colors.graphite, borderColor: colors.graphite },
});
