// Number and date formatting in one place, so every page says the same thing the same way.

/** A fraction 0..1 as a percentage with one decimal: 0.9641 → "96.4 %". */
export function formatPercent(fraction: number, digits = 1): string {
  if (!Number.isFinite(fraction)) return "—";
  // A no-break space keeps the number and its unit together when a narrow column wraps.
  return `${(fraction * 100).toFixed(digits)}\u00a0%`;
}

/** A yield with its interval: "96.4 % (94.1–97.9)". */
export function formatYield(y: { yield: number; low: number; high: number }): string {
  return `${formatPercent(y.yield)} (${(y.low * 100).toFixed(1)}–${(y.high * 100).toFixed(1)})`;
}

/** A target yield: 0.95 → "95 %" (no decimals when whole). */
export function formatTarget(fraction: number): string {
  const pct = fraction * 100;
  return `${Number.isInteger(Math.round(pct * 10) / 10) && Math.abs(pct - Math.round(pct)) < 1e-9 ? Math.round(pct) : pct.toFixed(1)} %`;
}

const dateTime = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short" });
const dateOnly = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium" });

export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return "—";
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : dateTime.format(d);
}

export function formatDate(iso: string | null | undefined): string {
  if (!iso) return "—";
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : dateOnly.format(d);
}

/** Short form of a content hash for display: first 12 characters. */
export function shortHash(hash: string | null | undefined): string {
  return hash ? hash.slice(0, 12) : "—";
}
