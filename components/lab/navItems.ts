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
};

export const navItems: NavItem[] = [
  { key: 'home', label: 'Home', href: '/', icon: 'home', match: '/' },
  { key: 'parts', label: 'Parts', href: '/parts', icon: 'parts', roles: ['designer', 'planner', 'lead'], match: '/parts' },
  { key: 'requests', label: 'Requests', href: '/requests', icon: 'requests', roles: ['designer', 'planner', 'lead'], match: '/requests' },
  { key: 'plans', label: 'Plans', href: '/plans', icon: 'plans', roles: ['planner', 'lead'], match: '/plans' },
  { key: 'review', label: 'Review', href: '/review', icon: 'review', roles: ['lead'], match: '/review' },
  { key: 'queue', label: 'Queue', href: '/queue', icon: 'queue', roles: ['planner', 'lead', 'operator'], match: '/queue' },
  { key: 'floor', label: 'Floor', href: '/floor', icon: 'floor', roles: ['operator', 'lead'], match: '/floor' },
  { key: 'powder', label: 'Powder', href: '/powder', icon: 'powder', roles: ['planner', 'lead', 'operator'], match: '/powder' },
  { key: 'settings', label: 'Settings', href: '/settings', icon: 'settings', match: '/settings' },
];

export function visibleNavItems(has: (role: Role) => boolean): NavItem[] {
  return navItems.filter((item) => !item.roles || item.roles.some(has));
}

export function isActive(item: NavItem, pathname: string): boolean {
  if (item.match === '/') return pathname === '/' || pathname === '';
  return pathname === item.match || pathname.startsWith(`${item.match}/`);
}
