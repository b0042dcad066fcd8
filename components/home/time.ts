/** "in 3 h 20 min", "12 min ago": how far a predicted time is from now. */
export function relativeTime(iso: string, nowMs: number): string {
  const t = Date.parse(iso);
  if (!Number.isFinite(t)) return '';
  const minutes = Math.round((t - nowMs) / 60_000);
  const abs = Math.abs(minutes);
  let span: string;
  if (abs < 1) return t <= nowMs ? 'just now' : 'now';
  if (abs < 60) span = `${abs} min`;
  else if (abs < 48 * 60) {
    const h = Math.floor(abs / 60);
    const m = abs % 60;
    span = m ? `${h} h ${m} min` : `${h} h`;
  } else span = `${Math.round(abs / 1440)} d`;
  return minutes > 0 ? `in ${span}` : `${span} ago`;
}

/** Hours late as the lab reads them: "5 h", "2.5 d". */
export function formatLateBy(hours: number): string {
  if (hours < 48) return `${Math.max(1, Math.round(hours))} h`;
  return `${Number((hours / 24).toFixed(1))} d`;
}
