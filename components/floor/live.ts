import { useEffect, useState } from 'react';
import { cakeCoreTempC } from '../../shared/estimate/conduction';
import type { CoolingTimer } from '../../shared/floor';

/** The clock, ticking once per `everyMs`, for timers that count down on screen between refreshes. */
export function useNow(everyMs = 1000): number {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const id = setInterval(() => setNow(Date.now()), everyMs);
    return () => clearInterval(id);
  }, [everyMs]);
  return now;
}

/** How far the phone's clock is behind the server's (ms): timers run on the server's time. */
export function clockOffsetMs(serverNowIso: string, receivedAtMs: number): number {
  const server = Date.parse(serverNowIso);
  return Number.isFinite(server) && receivedAtMs > 0 ? server - receivedAtMs : 0;
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '–';
  const s = Math.max(0, Math.round(seconds));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  if (h > 0) return `${h} h ${String(m).padStart(2, '0')} min`;
  if (m > 0) return `${m} min ${String(s % 60).padStart(2, '0')} s`;
  return `${s} s`;
}

/** A time of day, with the date when it is not today. */
export function formatClock(ms: number, nowMs = Date.now()): string {
  if (!Number.isFinite(ms)) return '–';
  const d = new Date(ms);
  const pad = (n: number) => String(n).padStart(2, '0');
  const time = `${pad(d.getHours())}:${pad(d.getMinutes())}`;
  const today = new Date(nowMs);
  if (d.toDateString() === today.toDateString()) return time;
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())} ${time}`;
}

export interface LiveCooling {
  phase: CoolingTimer['phase'];
  predictedTempC: number;
  remainingToRemovalSeconds: number;
  remainingToHandlingSeconds: number;
  removalReached: boolean;
  handlingReached: boolean;
}

/**
 * The server's cooling curve carried forward to now: the curve changes only with a reading (which refreshes the
 * run), so between refreshes the timer is the same conduction model of the cake read at a later time.
 */
export function liveCooling(timer: CoolingTimer, nowMs: number): LiveCooling {
  const removalReached = timer.removalReached || nowMs >= timer.removalAtMs;
  const handlingReached = timer.handlingReached || nowMs >= timer.handlingAtMs;
  const outsideNow = nowMs >= timer.outsideStartMs;
  return {
    phase: handlingReached ? 'cooled' : outsideNow ? 'outside' : 'in_machine',
    predictedTempC: cakeCoreTempC(timer.cake, Math.max(0, (nowMs - timer.printEndedAtMs) / 1000)),
    remainingToRemovalSeconds: removalReached ? 0 : Math.max(0, (timer.removalAtMs - nowMs) / 1000),
    remainingToHandlingSeconds: handlingReached ? 0 : Math.max(0, (timer.handlingAtMs - nowMs) / 1000),
    removalReached,
    handlingReached,
  };
}
