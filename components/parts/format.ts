import { formatNumber } from '../ui/format';

/** "120.5 × 40 × 12.25" (mm), each to at most two decimals. */
export function formatSize(size: readonly number[]): string {
  return size.map((v) => formatNumber(v, 2)).join(' × ');
}

/** Volumes read best in cm³ once they pass a thousand mm³. */
export function formatVolume(volumeMm3: number): string {
  if (Math.abs(volumeMm3) >= 1000) return `${formatNumber(volumeMm3 / 1000, 2)} cm³`;
  return `${formatNumber(volumeMm3, 1)} mm³`;
}

export function formatArea(areaMm2: number): string {
  if (Math.abs(areaMm2) >= 10_000) return `${formatNumber(areaMm2 / 100, 1)} cm²`;
  return `${formatNumber(areaMm2, 1)} mm²`;
}

export function formatBytes(bytes: number | null | undefined): string {
  if (bytes === null || bytes === undefined) return '';
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${formatNumber(bytes / 1024, 1)} KB`;
  return `${formatNumber(bytes / (1024 * 1024), 1)} MB`;
}

export function formatCount(n: number): string {
  return n.toLocaleString('en-US');
}
