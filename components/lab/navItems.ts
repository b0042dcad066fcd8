import type { Href } from 'expo-router';
import type { IconName } from '../ui';
import type { Role } from '../../shared/schemas/auth';

export type NavItem = {
  key: 'home' | 'parts' | 'requests' | 'plans' | 'review' | 'queue' | 'floor' | 'powder' | 'settings';
  label: string;
  href: Href;
  icon: IconName;
  /** Roles the item is useful for; undefined: everyone. */
  roles?: Role[];
  /** Path prefix that marks the item active. */
  match: string;
  /** Which items keep a tab of their own on a phone when not all fit (lower first). */
  phoneRank: number;
};

export const navItems: NavItem[] = [
  { key: 'home', label: 'Home', href: '/', icon: 'home', match: '/', phoneRank: 0 },
  { key: 'parts', label: 'Parts', href: '/parts', icon: 'parts', roles: ['designer', 'planner', 'lead'], match: '/parts', phoneRank: 5 },
  { key: 'requests', label: 'Requests', href: '/requests', icon: 'requests', roles: ['designer', 'planner', 'lead'], match: '/requests', phoneRank: 4 },
  { key: 'plans', label: 'Plans', href: '/plans', icon: 'plans', roles: ['planner', 'lead'], match: '/plans', phoneRank: 3 },
  { key: 'review', label: 'Review', href: '/review', icon: 'review', roles: ['lead'], match: '/review', phoneRank: 1 },
  { key: 'queue', label: 'Queue', href: '/queue', icon: 'queue', roles: ['planner', 'lead', 'operator'], match: '/queue', phoneRank: 2 },
  { key: 'floor', label: 'Floor', href: '/floor', icon: 'floor', roles: ['operator', 'lead'], match: '/floor', phoneRank: 2 },
  { key: 'powder', label: 'Powder', href: '/powder', icon: 'powder', roles: ['planner', 'lead', 'operator'], match: '/powder', phoneRank: 6 },
  { key: 'settings', label: 'Settings', href: '/settings', icon: 'settings', match: '/settings', phoneRank: 7 },
];

export function visibleNavItems(has: (role: Role) => boolean): NavItem[] {
  return navItems.filter((item) => !item.roles || item.roles.some(has));
}

export function isActive(item: NavItem, pathname: string): boolean {
  if (item.match === '/') return pathname === '/' || pathname === '';
  return pathname === item.match || pathname.startsWith(`${item.match}/`);
}

/** Tabs a phone's bar holds; with more items, the last place opens a list of the rest. */
export const PHONE_TABS = 5;

/**
 * The items that get a tab of their own on a phone, in the rail's order, and
 * the rest (reached through "More"): everything fits when there are at most
 * PHONE_TABS; otherwise the PHONE_TABS - 1 most used by the member's roles.
 */
export function phoneTabs(items: NavItem[]): { tabs: NavItem[]; more: NavItem[] } {
  if (items.length <= PHONE_TABS) return { tabs: items, more: [] };
  const keep = new Set([...items].sort((a, b) => a.phoneRank - b.phoneRank).slice(0, PHONE_TABS - 1).map((i) => i.key));
  return { tabs: items.filter((i) => keep.has(i.key)), more: items.filter((i) => !keep.has(i.key)) };
}
