/**
 * Calendar days as `YYYY-MM-DD` strings. A tally's day is a calendar day, not an instant: all
 * arithmetic runs on UTC midnights of the written day so no time zone can move a count to the
 * day before or after.
 */
const DAY_MS = 86_400_000;

/** The device's own calendar day (its local time zone), the day a field officer means by "today". */
export function localToday(now: Date = new Date()): string {
  const y = now.getFullYear();
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

/** Today in UTC: the server's default when the client does not say which day it is. */
export function utcToday(now: Date = new Date()): string {
  return now.toISOString().slice(0, 10);
}

const toMs = (day: string) => Date.parse(`${day}T00:00:00Z`);

/** `day` moved by `n` days (n may be negative). */
export function addDays(day: string, n: number): string {
  return new Date(toMs(day) + n * DAY_MS).toISOString().slice(0, 10);
}

/** Whole days from `a` to `b` (positive when b is later). */
export function daysBetween(a: string, b: string): number {
  return Math.round((toMs(b) - toMs(a)) / DAY_MS);
}

/** True when `s` is a `YYYY-MM-DD` day that exists on the calendar. */
export function isIsoDay(s: string): boolean {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
  const ms = toMs(s);
  return !Number.isNaN(ms) && new Date(ms).toISOString().slice(0, 10) === s;
}

/** Every day from `from` to `to`, both included. */
export function dayRange(from: string, to: string): string[] {
  const n = daysBetween(from, to);
  const out: string[] = [];
  for (let i = 0; i <= n; i++) out.push(addDays(from, i));
  return out;
}
