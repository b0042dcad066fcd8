import type { BadgeTone } from '../ui';
import type { LabRequest } from '../queries/requests';

export const PRIORITY_LABELS: Record<LabRequest['priority'], string> = { low: 'Low', normal: 'Normal', high: 'High', urgent: 'Urgent' };
export const PRIORITY_TONES: Record<LabRequest['priority'], BadgeTone> = { low: 'neutral', normal: 'neutral', high: 'amber', urgent: 'danger' };
/** The one spelling of a priority on every screen ("High", never "high"). */
export function priorityLabel(p: string): string {
  return PRIORITY_LABELS[p as LabRequest['priority']] ?? p;
}
export function priorityTone(p: string): BadgeTone {
  return PRIORITY_TONES[p as LabRequest['priority']] ?? 'neutral';
}
export const STATUS_LABELS: Record<LabRequest['status'], string> = { open: 'Open', cancelled: 'Cancelled', done: 'Done' };
export const STATUS_TONES: Record<LabRequest['status'], BadgeTone> = { open: 'ember', cancelled: 'neutral', done: 'teal' };

/** Today as YYYY-MM-DD in the device's time zone. */
export function todayIso(now = new Date()): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${now.getFullYear()}-${pad(now.getMonth() + 1)}-${pad(now.getDate())}`;
}

export function addDaysIso(iso: string, days: number): string {
  const [y, m, d] = iso.split('-').map(Number);
  const t = new Date(y, m - 1, d + days);
  return todayIso(t);
}

/** Whole days from today to the due date (negative when late). */
export function daysUntil(dueIso: string, now = new Date()): number {
  const [y, m, d] = dueIso.split('-').map(Number);
  const due = new Date(y, m - 1, d).getTime();
  const [ty, tm, td] = todayIso(now).split('-').map(Number);
  return Math.round((due - new Date(ty, tm - 1, td).getTime()) / 86_400_000);
}

export function dueText(dueIso: string, status: LabRequest['status']): string {
  if (status !== 'open') return dueIso;
  const n = daysUntil(dueIso);
  if (n < 0) return `${dueIso} · ${-n} d late`;
  if (n === 0) return `${dueIso} · today`;
  return `${dueIso} · in ${n} d`;
}
