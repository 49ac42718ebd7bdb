/**
 * Failed sign-in throttle, per account and per client address: after 5 failures within a
 * minute, further attempts are refused for a back-off that doubles with each extra failure
 * (30 s, 60 s, … capped at 15 min). Kept in process memory: with several app servers each keeps
 * its own counts (DEVELOPERS.md, "Several app servers"), which still bounds guessing per server.
 */
const WINDOW_MS = 60_000;
const MAX_FAILURES = 5;
const BASE_BACKOFF_MS = 30_000;
const MAX_BACKOFF_MS = 15 * 60_000;

interface Entry {
  failures: number[];
  blockedUntil: number;
  strikes: number;
}

const g = globalThis as unknown as { __ebbcastSignInThrottle?: Map<string, Entry> };
const table: Map<string, Entry> = (g.__ebbcastSignInThrottle ??= new Map<string, Entry>());

const keys = (email: string, address: string) => [`a:${email.toLowerCase()}`, `ip:${address}`];

/** Seconds to wait before another attempt is allowed, or 0. */
export function retryAfterSeconds(email: string, address: string, now = Date.now()): number {
  let wait = 0;
  for (const k of keys(email, address)) {
    const e = table.get(k);
    if (e && e.blockedUntil > now) wait = Math.max(wait, Math.ceil((e.blockedUntil - now) / 1000));
  }
  return wait;
}

export function recordFailure(email: string, address: string, now = Date.now()): void {
  for (const k of keys(email, address)) {
    const e = table.get(k) ?? { failures: [], blockedUntil: 0, strikes: 0 };
    e.failures = e.failures.filter((t) => now - t < WINDOW_MS);
    e.failures.push(now);
    if (e.failures.length >= MAX_FAILURES) {
      e.strikes += 1;
      e.blockedUntil = now + Math.min(BASE_BACKOFF_MS * 2 ** (e.strikes - 1), MAX_BACKOFF_MS);
      e.failures = [];
    }
    table.set(k, e);
  }
}

export function recordSuccess(email: string): void {
  table.delete(`a:${email.toLowerCase()}`);
}

/** For tests. */
export function resetThrottle(): void {
  table.clear();
}
