/** Dates as the lab reads them: "2026-03-04" plus the local time where it matters. */
export function formatDate(iso: string | null | undefined): string {
  if (!iso) return '–';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '–';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${formatDate(iso)} ${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A number without float noise: 0.1 + 0.2 shows as 0.3. */
export function formatNumber(n: number, maxDecimals = 3): string {
  if (!Number.isFinite(n)) return String(n);
  return String(Number(n.toFixed(maxDecimals)));
}
