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

/**
 * An amount in the lab's currency, led by its ISO 4217 code ("EUR 1,234.50"),
 * with the currency's own decimals (none for JPY); "–" when there is none.
 */
export function formatMoney(value: number | null | undefined, currency: string | undefined): string {
  if (value == null || !Number.isFinite(value)) return '–';
  if (!currency) return value.toLocaleString('en-US', { minimumFractionDigits: 2, maximumFractionDigits: 2 });
  try {
    return new Intl.NumberFormat('en-US', { style: 'currency', currency, currencyDisplay: 'code' }).format(value).replace(/\u00a0/g, ' ');
  } catch {
    return `${currency} ${value.toLocaleString('en-US', { minimumFractionDigits: 2, maximumFractionDigits: 2 })}`;
  }
}
