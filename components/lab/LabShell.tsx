import { usePathname } from 'expo-router';
import { useEffect, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { useMeQuery, useSignOutMutation } from '../queries/me';
import { usePlansQuery } from '../queries/plans';
import { useLabLiveUpdates } from '../queries/live';
import { colors, radius, railWidth, spacing, useIsWide } from '../theme';
import { Icon, LinkPressable, Text } from '../ui';
import { LabSwitcher } from './LabSwitcher';
import { isActive, phoneTabs, visibleNavItems, type NavItem } from './navItems';
import { useLab } from './useCurrentLab';
import { LogoMark, Wordmark } from './Wordmark';

/** The frame around every lab screen: a side rail on wide screens, a top bar and tab bar on phones. */
export function LabShell({ children }: { children: React.ReactNode }) {
  const wide = useIsWide();
  const lab = useLab();
  const items = visibleNavItems(lab.has);
  // Every screen of the lab follows changes made elsewhere as they happen.
  useLabLiveUpdates(lab.id);
  // Leads see how many plans wait for their decision beside Review.
  const inReview = usePlansQuery(lab.isLead ? lab.id : undefined, IN_REVIEW);
  const counts: Partial<Record<NavItem['key'], number>> = { review: inReview.data?.length ?? 0 };
  return wide ? (
    <RailFrame items={items} counts={counts}>
      {children}
    </RailFrame>
  ) : (
    <TabFrame items={items} counts={counts}>
      {children}
    </TabFrame>
  );
}

const IN_REVIEW = ['in_review'] as const;

/** A small count beside a navigation item; nothing when there is nothing waiting. */
function CountPill({ count, item, tone }: { count: number | undefined; item: NavItem['key'] | 'more'; tone: 'dark' | 'light' }) {
  if (!count) return null;
  return (
    <View style={[styles.count, tone === 'light' && styles.countLight]} testID={`nav-count-${item}`} accessibilityLabel={`${count} waiting`}>
      <Text variant="caption" style={styles.countText}>
        {count > 99 ? '99+' : String(count)}
      </Text>
    </View>
  );
}

function RailFrame({ items, counts, children }: { items: NavItem[]; counts: Partial<Record<NavItem['key'], number>>; children: React.ReactNode }) {
  const pathname = usePathname();
  const { data: me } = useMeQuery();
  const signOut = useSignOutMutation();
  return (
    <View style={styles.wideRoot}>
      <View style={styles.rail} role="navigation" testID="nav-rail">
        <View style={styles.railTop}>
          <Wordmark tone="dark" />
          <LabSwitcher tone="dark" />
        </View>
        <View style={styles.railItems}>
          {items.map((item) => {
            const active = isActive(item, pathname);
            return (
              <LinkPressable key={item.key} href={item.href}
                  testID={`nav-${item.key}`}
                  accessibilityRole="link"
                  accessibilityLabel={item.label}
                  accessibilityState={{ selected: active }}
                  style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
                    styles.railItem,
                    (pressed || hovered) && styles.railItemHover,
                    active && styles.railItemActive,
                  ]}
                >
                  <View style={[styles.railMarker, active && styles.railMarkerActive]} />
                  <Icon name={item.icon} color={active ? colors.ember : colors.onGraphiteMuted} />
                  <Text variant="bodyStrong" style={{ color: active ? colors.onGraphite : colors.onGraphiteMuted, flex: 1 }}>
                    {item.label}
                  </Text>
                  <CountPill count={counts[item.key]} item={item.key} tone="dark" />
                </LinkPressable>
            );
          })}
        </View>
        <View style={styles.railFoot}>
          <View style={styles.userBlock}>
            <Text variant="label" style={{ color: colors.onGraphite }} numberOfLines={1}>
              {me?.user.name}
            </Text>
            <Text variant="caption" style={{ color: colors.onGraphiteMuted }} numberOfLines={1}>
              {me?.user.email}
            </Text>
          </View>
          <Pressable
            testID="sign-out"
            accessibilityRole="button"
            accessibilityLabel="Sign out"
            onPress={() => signOut.mutate()}
            style={({ pressed }) => [styles.signOut, pressed && styles.railItemHover]}
          >
            <Icon name="signOut" size={20} color={colors.onGraphiteMuted} />
            <Text variant="label" style={{ color: colors.onGraphiteMuted }}>
              Sign out
            </Text>
          </Pressable>
        </View>
      </View>
      <View style={styles.main}>{children}</View>
    </View>
  );
}

function TabFrame({ items, counts, children }: { items: NavItem[]; counts: Partial<Record<NavItem['key'], number>>; children: React.ReactNode }) {
  const pathname = usePathname();
  const insets = useSafeAreaInsets();
  const [moreOpen, setMoreOpen] = useState(false);
  const { tabs, more } = phoneTabs(items);
  const moreActive = more.some((item) => isActive(item, pathname));
  const moreCount = more.reduce((sum, item) => sum + (counts[item.key] ?? 0), 0);
  // A page reached from the list closes it; so does any other navigation.
  useEffect(() => setMoreOpen(false), [pathname]);
  return (
    <View style={[styles.narrowRoot, { paddingTop: insets.top }]}>
      <View style={styles.topBar}>
        <LogoMark size={26} />
        <View style={styles.topLab}>
          <LabSwitcher tone="light" />
        </View>
      </View>
      <View style={styles.main}>{children}</View>
      {moreOpen ? (
        <Pressable style={styles.moreBackdrop} onPress={() => setMoreOpen(false)} accessibilityLabel="Close the list" testID="nav-more-backdrop" />
      ) : null}
      <View style={[styles.tabBar, { paddingBottom: Math.max(insets.bottom, spacing.xs) }]} accessibilityRole="tablist" testID="nav-tabs">
        {moreOpen ? (
          <View style={styles.moreSheet} role="menu" testID="nav-more-sheet">
            {more.map((item) => {
              const active = isActive(item, pathname);
              return (
                <LinkPressable key={item.key} href={item.href}
                  testID={`nav-${item.key}`}
                  accessibilityRole="link"
                  accessibilityLabel={item.label}
                  accessibilityState={{ selected: active }}
                  onPress={() => setMoreOpen(false)}
                  style={({ pressed }: { pressed: boolean }) => [styles.moreRow, (pressed || active) && { backgroundColor: colors.powderDeep }]}
                >
                  <Icon name={item.icon} size={22} color={active ? colors.ember : colors.inkMuted} />
                  <Text variant="bodyStrong" style={{ flex: 1, color: active ? colors.ink : colors.inkMuted }}>
                    {item.label}
                  </Text>
                  <CountPill count={counts[item.key]} item={item.key} tone="dark" />
                </LinkPressable>
              );
            })}
          </View>
        ) : null}
        {tabs.map((item) => (
          <TabButton key={item.key} item={item} active={isActive(item, pathname)} count={counts[item.key]} />
        ))}
        {more.length > 0 ? (
          <Pressable
            testID="nav-more"
            accessibilityRole="tab"
            accessibilityLabel={`More: ${more.map((i) => i.label).join(', ')}`}
            accessibilityState={{ selected: moreActive, expanded: moreOpen }}
            onPress={() => setMoreOpen((open) => !open)}
            style={({ pressed }) => [styles.tab, (pressed || moreOpen) && { backgroundColor: colors.powderDeep }]}
          >
            <View style={[styles.tabMarker, moreActive && styles.tabMarkerActive]} />
            <View>
              <Icon name="more" size={22} color={moreActive ? colors.ember : colors.inkMuted} />
              <View style={styles.tabCount}>
                <CountPill count={moreCount} item="more" tone="light" />
              </View>
            </View>
            <Text variant="caption" numberOfLines={1} style={[styles.tabLabel, { color: moreActive ? colors.ink : colors.inkMuted }]}>
              More
            </Text>
          </Pressable>
        ) : null}
      </View>
    </View>
  );
}

function TabButton({ item, active, count }: { item: NavItem; active: boolean; count: number | undefined }) {
  return (
    <LinkPressable href={item.href}
      testID={`nav-${item.key}`}
      accessibilityRole="tab"
      accessibilityLabel={item.label}
      accessibilityState={{ selected: active }}
      style={({ pressed }: { pressed: boolean }) => [styles.tab, pressed && { backgroundColor: colors.powderDeep }]}
    >
      <View style={[styles.tabMarker, active && styles.tabMarkerActive]} />
      <View>
        <Icon name={item.icon} size={22} color={active ? colors.ember : colors.inkMuted} />
        <View style={styles.tabCount}>
          <CountPill count={count} item={item.key} tone="light" />
        </View>
      </View>
      <Text variant="caption" numberOfLines={1} style={[styles.tabLabel, { color: active ? colors.ink : colors.inkMuted }]}>
        {item.label}
      </Text>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  wideRoot: { flex: 1, flexDirection: 'row', backgroundColor: colors.powder },
  rail: {
    width: railWidth,
    backgroundColor: colors.graphite,
    paddingVertical: spacing.xl,
    paddingHorizontal: spacing.md,
    gap: spacing.xl,
  },
  railTop: { gap: spacing.lg, paddingHorizontal: spacing.sm, zIndex: 10 },
  railItems: { gap: spacing.xxs, flex: 1 },
  railItem: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    minHeight: 48,
    paddingHorizontal: spacing.md,
    borderRadius: radius.md,
  },
  railItemHover: { backgroundColor: colors.graphiteRaised },
  railItemActive: { backgroundColor: colors.graphiteRaised },
  railMarker: { position: 'absolute', left: 0, top: 12, bottom: 12, width: 3, borderRadius: 2, backgroundColor: 'transparent' },
  railMarkerActive: { backgroundColor: colors.ember },
  railFoot: { gap: spacing.sm, borderTopWidth: 1, borderTopColor: colors.graphiteRaised, paddingTop: spacing.lg },
  userBlock: { paddingHorizontal: spacing.md, gap: 2 },
  signOut: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, minHeight: 44, paddingHorizontal: spacing.md, borderRadius: radius.md },
  main: { flex: 1, minWidth: 0 },
  narrowRoot: { flex: 1, backgroundColor: colors.powder },
  topBar: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.md,
    minHeight: 56,
    paddingHorizontal: spacing.lg,
    paddingVertical: spacing.xs,
    backgroundColor: colors.surface,
    borderBottomWidth: 1,
    borderBottomColor: colors.line,
    zIndex: 10,
  },
  topLab: { flex: 1, minWidth: 0 },
  tabBar: {
    flexDirection: 'row',
    zIndex: 20,
    backgroundColor: colors.surface,
    borderTopWidth: 1,
    borderTopColor: colors.line,
  },
  tab: { flex: 1, alignItems: 'center', justifyContent: 'center', minHeight: 56, paddingTop: spacing.xs, gap: 2 },
  tabMarker: { position: 'absolute', top: 0, left: '25%', right: '25%', height: 3, borderRadius: 2, backgroundColor: 'transparent' },
  tabMarkerActive: { backgroundColor: colors.ember },
  moreBackdrop: { position: 'absolute', left: 0, right: 0, top: 0, bottom: 0, backgroundColor: 'rgba(20, 24, 28, 0.28)', zIndex: 15 },
  moreSheet: {
    position: 'absolute',
    right: spacing.sm,
    bottom: '100%',
    marginBottom: spacing.xs,
    minWidth: 220,
    paddingVertical: spacing.xs,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    shadowColor: '#000',
    shadowOpacity: 0.16,
    shadowRadius: 12,
    shadowOffset: { width: 0, height: 4 },
    elevation: 6,
  },
  moreRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, minHeight: 48, paddingHorizontal: spacing.lg },
  tabLabel: { fontSize: 11, lineHeight: 14 },
  tabCount: { position: 'absolute', top: -6, right: -14 },
  count: { minWidth: 22, height: 20, paddingHorizontal: 6, borderRadius: radius.pill, backgroundColor: colors.ember, alignItems: 'center', justifyContent: 'center' },
  countLight: { minWidth: 18, height: 16, paddingHorizontal: 4 },
  countText: { color: colors.onGraphite, fontSize: 11, lineHeight: 14 },
});
