/** How values read on screen: units always, UTC timestamps, revisions as rN, hashes as 0x… in mono. */
export const rev = (n: number | null | undefined) => (n == null ? '—' : `r${n}`);

export function count(n: number | null | undefined, unit: string): string {
  return n == null ? '—' : `${n} ${unit}${n === 1 ? '' : 's'}`;
}

export const bits = (n: number | null | undefined) => count(n, 'bit');

export function bytes(n: number | null | undefined): string {
  if (n == null) return '—';
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${(n / (1024 * 1024)).toFixed(2)} MiB`;
}

/** Delays are integers in the design's time unit, shown as ps (SPEC §1). */
export const delay = (n: number | null | undefined) => (n == null ? '—' : `${n} ps`);

export function utc(value: string | number | Date | null | undefined): string {
  if (value == null) return '—';
  const d = new Date(value);
  if (Number.isNaN(d.getTime())) return '—';
  return d.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

export function ago(value: string | number | Date | null | undefined): string {
  if (value == null) return '—';
  const s = Math.round((Date.now() - new Date(value).getTime()) / 1000);
  if (s < 60) return 'just now';
  if (s < 3600) return `${Math.floor(s / 60)} min ago`;
  if (s < 86400) return `${Math.floor(s / 3600)} h ago`;
  return `${Math.floor(s / 86400)} d ago`;
}

export const hash = (hex: string | null | undefined, len = 12) => (hex ? `0x${hex.slice(0, len)}` : '—');

export const KIND_LABEL: Record<string, string> = { 'ripple-carry': 'ripple-carry', 'carry-skip': 'carry-skip', other: 'other' };
