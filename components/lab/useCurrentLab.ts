import { useMeQuery } from '../queries/me';
import { setCurrentLabId, useCurrentLabId } from '../stores/labStore';
import type { LabSummaryView as LabSummary, Role } from '../../shared/schemas/auth';

export type CurrentLab = LabSummary & {
  has: (role: Role) => boolean;
  isLead: boolean;
};

/**
 * The lab the user works in: the stored choice when they still belong to it,
 * else their first lab. Undefined while signed out or in no lab.
 */
export function useCurrentLab(): CurrentLab | undefined {
  const { data: me } = useMeQuery();
  const chosen = useCurrentLabId();
  const labs = me?.labs ?? [];
  const lab = labs.find((l) => l.id === chosen) ?? labs[0];
  if (!lab) return undefined;
  const has = (role: Role) => lab.roles.includes(role);
  return { ...lab, has, isLead: has('lead') };
}

/** For screens inside the (lab) group, whose layout guarantees a lab. */
export function useLab(): CurrentLab {
  const lab = useCurrentLab();
  if (!lab) throw new Error('useLab is used outside a lab');
  return lab;
}

export function chooseLab(labId: string): void {
  setCurrentLabId(labId);
}
