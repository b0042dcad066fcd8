import { ROLES as roles, type Role } from '../../shared/schemas/auth';
import type { BadgeTone } from '../ui';

export { roles, type Role };

export const roleLabels: Record<Role, string> = {
  designer: 'Designer',
  planner: 'Planner',
  lead: 'Lead',
  operator: 'Operator',
};

export const roleHints: Record<Role, string> = {
  designer: 'uploads parts and files requests',
  planner: 'packs requests into builds',
  lead: 'reviews plans, runs the lab',
  operator: 'runs builds at the machine',
};

export const roleTones: Record<Role, BadgeTone> = {
  designer: 'neutral',
  planner: 'amber',
  lead: 'ember',
  operator: 'teal',
};

/** Roles in their fixed display order, whatever order the server sent. */
export function sortRoles(list: readonly Role[]): Role[] {
  return roles.filter((r) => list.includes(r));
}

/** Who files part requests (the server holds the same rule). */
export function canFileRequests(has: (role: 'designer' | 'lead') => boolean): boolean {
  return has('designer') || has('lead');
}
