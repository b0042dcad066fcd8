import { formatMoney } from '../ui/format';
import type { PlanStatus } from '../../shared/plans/status';
import type { BadgeTone } from '../ui';

export { STATUS_LABELS } from '../../shared/plans/status';

export const STATUS_TONES: Record<PlanStatus, BadgeTone> = {
  draft: 'neutral',
  in_review: 'amber',
  changes_requested: 'danger',
  approved: 'teal',
  queued: 'teal',
  printing: 'ember',
  cooling: 'ember',
  breakout: 'ember',
  finishing: 'ember',
  done: 'teal',
  cancelled: 'neutral',
  aborted: 'danger',
};

export function hours(seconds: number | null | undefined): string {
  if (seconds == null || !Number.isFinite(seconds)) return '–';
  const h = seconds / 3600;
  return `${h < 10 ? h.toFixed(1) : Math.round(h)} h`;
}

export function kg(value: number | null | undefined): string {
  if (value == null || !Number.isFinite(value)) return '–';
  return `${value < 10 ? value.toFixed(2) : value.toFixed(1)} kg`;
}

export function percent(share: number | null | undefined): string {
  if (share == null || !Number.isFinite(share)) return '–';
  return `${(share * 100).toFixed(1)} %`;
}

/** An amount, led by the lab's currency code once it is known. */
export function money(value: number | null | undefined, currency?: string): string {
  return formatMoney(value, currency);
}

export function mm(value: number | null | undefined): string {
  if (value == null || !Number.isFinite(value)) return '–';
  return `${value.toFixed(1)} mm`;
}
