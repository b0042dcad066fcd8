/**
 * The queue's time axis (pure, tested without a renderer): ticks at round
 * local times whose step suits the span, and dates that read one way only,
 * with the month named ("2 Dec 06:45"), whatever the reader's locale.
 */
import { format } from 'date-fns';

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
/** Steps a reader counts in: quarter and half hours, hours, parts of a day, days, a week. */
const STEPS = [15 * MIN, 30 * MIN, HOUR, 2 * HOUR, 3 * HOUR, 6 * HOUR, 12 * HOUR, DAY, 2 * DAY, 7 * DAY];

export interface TimeTick {
  atMs: number;
  /** "06:00", or the day ("Wed 2 Dec") where a day starts, at the first tick and on a step of a day or more. */
  label: string;
  /** The tick starts a new day (drawn stronger). */
  day: boolean;
}

/** The smallest round step that gives at most `maxTicks` ticks over the span. */
export function tickStep(spanMs: number, maxTicks: number): number {
  return STEPS.find((s) => spanMs / s <= maxTicks) ?? STEPS[STEPS.length - 1] * Math.ceil(spanMs / maxTicks / STEPS[STEPS.length - 1]);
}

/** Ticks from the first round time at or after `fromMs` up to `toMs`, in the local time zone. */
export function timeTicks(fromMs: number, toMs: number, maxTicks: number): TimeTick[] {
  if (!(toMs > fromMs) || maxTicks < 1) return [];
  const step = tickStep(toMs - fromMs, maxTicks);
  const start = new Date(fromMs);
  // Round up in local time: to the hour (or quarter hour), then to a multiple of the step within the day.
  start.setSeconds(0, 0);
  if (step >= DAY) start.setHours(0, 0, 0, 0);
  const dayStart = new Date(start);
  dayStart.setHours(0, 0, 0, 0);
  let t = dayStart.getTime();
  while (t < fromMs) t += Math.min(step, DAY);
  const out: TimeTick[] = [];
  let lastDay = '';
  for (; t <= toMs; t += step) {
    const d = new Date(t);
    const dayKey = format(d, 'yyyy-MM-dd');
    const newDay = dayKey !== lastDay;
    const midnight = d.getHours() === 0 && d.getMinutes() === 0;
    out.push({ atMs: t, label: step >= DAY || (newDay && (out.length === 0 || midnight)) ? format(d, step >= DAY ? 'EEE d MMM' : 'd MMM HH:mm') : format(d, 'HH:mm'), day: newDay && midnight });
    lastDay = dayKey;
  }
  return out;
}

/** A moment as the lab reads it everywhere on the queue: "2 Dec 06:45". */
export function formatMoment(iso: string | number): string {
  return format(new Date(iso), 'd MMM HH:mm');
}
