'use client';
/**
 * The sync client of this tab: runs the engine (lib/sync/engine.ts) on the Dexie store at start-up,
 * when the network returns, on a timer while online, shortly after a local change, and on demand
 * ("Sync now"); retries with back-off; keeps the header's connectivity store current. Only one
 * run at a time; a request during a run queues one more run. The outbox is only ever emptied by
 * the server's answers, so a closed tab, a power cut or a failed push loses nothing.
 */
import { liveQuery } from 'dexie';
import type { Actor } from '@/lib/auth/actor';
import { roleMay } from '@/lib/auth/roles';
import { backoffMs, queueChange, syncOnce, type LocalRecord, type SyncReport } from '@/lib/sync/engine';
import type { SyncEntity } from '@/lib/validation/sync';
import { useConnectivity } from '@/lib/stores/connectivity';
import { askPersistentStorage, localDb } from './db';
import { DexieStore, ensureDeviceId } from './store';
import { useSyncStatus } from './sync-status';
import { fetchTransport } from './transport';

/** While online, a sync at least this often, ms. */
const INTERVAL_MS = 60_000;
/** A local change is pushed after this quiet time, ms (several quick entries go in one batch). */
const AFTER_CHANGE_MS = 1_500;
const ME_KEY = 'ebbcast.me';

let started = false;
let running: Promise<SyncReport> | null = null;
let again = false;
let failures = 0;
let retryTimer: ReturnType<typeof setTimeout> | null = null;
let changeTimer: ReturnType<typeof setTimeout> | null = null;
let store: DexieStore | null = null;

function getStore(): DexieStore {
  store ??= new DexieStore(localDb());
  return store;
}

function deviceLabel(): string {
  const ua = typeof navigator === 'undefined' ? '' : navigator.userAgent;
  const kind = /iPad|Tablet|Android(?!.*Mobile)/i.test(ua) ? 'Tablet' : /Mobile|Android|iPhone/i.test(ua) ? 'Phone' : 'Computer';
  return `${kind} ${new Date().toISOString().slice(0, 10)}`;
}

/** The signed-in user as the server says now; null with `status` 401 when the session has ended. */
async function whoIsSignedIn(): Promise<{ user: Actor | null; status: number }> {
  try {
    const res = await fetch('/api/me', { credentials: 'same-origin', cache: 'no-store' });
    if (!res.ok) return { user: null, status: res.status };
    const { user } = (await res.json()) as { user: Actor };
    try {
      localStorage.setItem(ME_KEY, JSON.stringify(user));
    } catch {
      /* storage full or blocked: the identity is only a convenience */
    }
    return { user, status: 200 };
  } catch {
    return { user: null, status: 0 };
  }
}

async function refreshCounts(): Promise<void> {
  const s = getStore();
  const [n, meta] = await Promise.all([s.outboxCount(), s.meta()]);
  useConnectivity.getState().set({ outboxSize: n, lastSyncAt: meta.lastSyncAt });
}

/** Deletes every local record, the outbox and the device id (sign-out of a different person). */
export async function clearLocalData(): Promise<void> {
  const db = localDb();
  await db.transaction('rw', [db.outbreaks, db.teams, db.sites, db.tallies, db.scenarios, db.shadow, db.outbox, db.meta, db.rejected, db.results], async () => {
    await Promise.all([db.outbreaks, db.teams, db.sites, db.tallies, db.scenarios, db.shadow, db.outbox, db.meta, db.rejected, db.results].map((t) => t.clear()));
  });
  useConnectivity.getState().set({ outboxSize: 0, lastSyncAt: null });
  useSyncStatus.getState().set({ lastReport: null, deviceId: null, needsSignIn: false, otherUserPending: false });
}

/**
 * Makes the local data belong to `user`: the first user of the device takes it; another user gets
 * a clean device only when the outbox is empty (the previous user's changes are never dropped).
 */
async function adoptUser(user: Actor): Promise<boolean> {
  const s = getStore();
  const meta = await s.meta();
  if (meta.userId === user.id) return true;
  if (meta.userId && (await s.outboxCount()) > 0) {
    useSyncStatus.getState().set({ otherUserPending: true });
    return false;
  }
  if (meta.userId) await clearLocalData();
  await ensureDeviceId();
  await s.tx((tx) => tx.setMeta({ userId: user.id, registeredFor: null, cursor: 0 }));
  useSyncStatus.getState().set({ otherUserPending: false });
  return true;
}

async function run(): Promise<SyncReport> {
  const conn = useConnectivity.getState();
  const status = useSyncStatus.getState();
  conn.set({ syncing: true });
  status.set({ lastAttemptAt: new Date().toISOString(), nextRetryAt: null });
  const s = getStore();
  let report: SyncReport;
  try {
    const who = await whoIsSignedIn();
    if (who.status === 401) {
      report = { ok: false, error: 'unauthenticated', message: 'Sign in to sync: the session has ended. Your changes wait on this device.', pushed: { applied: 0, duplicate: 0, conflict: 0, rejected: 0 }, pulled: 0, results: [] };
    } else if (!who.user) {
      report = { ok: false, error: who.status === 0 ? 'offline' : 'server', message: who.status === 0 ? 'No connection to the server.' : `The server answered ${who.status}.`, pushed: { applied: 0, duplicate: 0, conflict: 0, rejected: 0 }, pulled: 0, results: [] };
    } else if (!roleMay(who.user.role, 'sync:pull')) {
      // Administrators keep no field data on a device: nothing to sync.
      report = { ok: true, pushed: { applied: 0, duplicate: 0, conflict: 0, rejected: 0 }, pulled: 0, results: [] };
    } else if (!(await adoptUser(who.user))) {
      report = { ok: false, error: 'refused', message: 'This device holds unsynced changes of another user; they sync when that user signs in.', pushed: { applied: 0, duplicate: 0, conflict: 0, rejected: 0 }, pulled: 0, results: [] };
    } else {
      // The answers were kept with the outbox change (DexieStore.recordAnswer); keep the newest 300.
      report = await syncOnce(s, fetchTransport, { deviceLabel: deviceLabel() });
      if (report.results.length) {
        const db = localDb();
        await db.transaction('rw', db.results, async () => {
          const n = await db.results.count();
          if (n > 300) await db.results.orderBy('at').limit(n - 300).delete();
        });
      }
    }
  } catch (err) {
    report = { ok: false, error: 'server', message: err instanceof Error ? err.message : String(err), pushed: { applied: 0, duplicate: 0, conflict: 0, rejected: 0 }, pulled: 0, results: [] };
  }
  conn.set({ syncing: false, lastError: report.ok ? null : (report.message ?? report.error ?? 'Sync failed.') });
  status.set({ lastReport: report, needsSignIn: report.error === 'unauthenticated' });
  await refreshCounts().catch(() => undefined);
  if (report.ok) failures = 0;
  else if (report.error === 'offline' || report.error === 'server') scheduleRetry(++failures);
  return report;
}

function scheduleRetry(n: number) {
  if (retryTimer) clearTimeout(retryTimer);
  const wait = backoffMs(n);
  useSyncStatus.getState().set({ nextRetryAt: new Date(Date.now() + wait).toISOString() });
  retryTimer = setTimeout(() => {
    retryTimer = null;
    if (navigator.onLine) void requestSync();
  }, wait);
}

/** Starts a sync now, or one more right after the one running. Resolves with its report. */
export function requestSync(): Promise<SyncReport> {
  if (running) {
    again = true;
    return running;
  }
  running = run().finally(() => {
    running = null;
    if (again) {
      again = false;
      void requestSync();
    }
  });
  return running;
}

/** "Sync now": also clears the back-off, since the person asked. */
export function syncNow(): Promise<SyncReport> {
  failures = 0;
  if (retryTimer) clearTimeout(retryTimer);
  retryTimer = null;
  return requestSync();
}

/** Called after every local write: push soon if online. */
export function notifyLocalChange(): void {
  void refreshCounts().catch(() => undefined);
  if (changeTimer) clearTimeout(changeTimer);
  changeTimer = setTimeout(() => {
    changeTimer = null;
    if (navigator.onLine) void requestSync();
  }, AFTER_CHANGE_MS);
}

/** Starts the client once per tab (the header's status indicator calls it on every screen). */
export function startSyncClient(): void {
  if (started || typeof window === 'undefined') return;
  started = true;
  const conn = useConnectivity.getState();
  conn.set({ online: navigator.onLine });
  void (async () => {
    const deviceId = await ensureDeviceId();
    useSyncStatus.getState().set({ deviceId, persisted: await askPersistentStorage() });
    await refreshCounts();
    if (navigator.onLine) void requestSync();
  })().catch((err) => console.warn('Local database unavailable', err));
  // The outbox size in the header follows the database, whichever tab or screen wrote.
  liveQuery(() => localDb().outbox.count()).subscribe({
    next: (n) => useConnectivity.getState().set({ outboxSize: n }),
    error: () => undefined,
  });
  window.addEventListener('online', () => {
    useConnectivity.getState().set({ online: true });
    failures = 0;
    void requestSync();
  });
  window.addEventListener('offline', () => useConnectivity.getState().set({ online: false }));
  document.addEventListener('visibilitychange', () => {
    if (document.visibilityState === 'visible' && navigator.onLine) void requestSync();
  });
  setInterval(() => {
    if (navigator.onLine && document.visibilityState === 'visible') void requestSync();
  }, INTERVAL_MS);
}

/** The user whose data the device holds (for local writes), from the sync meta or the cached identity. */
async function localUserId(): Promise<string | null> {
  const meta = await getStore().meta();
  if (meta.userId) return meta.userId;
  try {
    const raw = localStorage.getItem(ME_KEY);
    const me = raw ? (JSON.parse(raw) as Actor) : null;
    if (me) {
      await getStore().tx((tx) => tx.setMeta({ userId: me.id }));
      return me.id;
    }
  } catch {
    /* no cached identity */
  }
  return null;
}

/**
 * Writes a record on the device and queues its mutation, in one strict-durability transaction
 * (SYNC.md principle 1). The screen does not wait for the network.
 */
export async function saveLocal(entity: SyncEntity, record: LocalRecord, payload: Record<string, unknown>): Promise<void> {
  await ensureDeviceId();
  await queueChange(getStore(), { entity, op: 'upsert', record, payload, userId: await localUserId() });
  notifyLocalChange();
}

/** Deletes a record on the device (a tombstone until the server answers) and queues the delete. */
export async function deleteLocal(entity: SyncEntity, record: LocalRecord): Promise<void> {
  await ensureDeviceId();
  await queueChange(getStore(), { entity, op: 'delete', record, payload: null, userId: await localUserId() });
  notifyLocalChange();
}

/** Saves records the API returned (first load before any pull): only where nothing local is newer. */
export async function cacheServerRecords(entity: 'outbreak' | 'team' | 'site' | 'tally' | 'scenario', records: LocalRecord[]): Promise<void> {
  if (!records.length) return;
  const db = localDb();
  const table = entity === 'outbreak' ? db.outbreaks : entity === 'team' ? db.teams : entity === 'site' ? db.sites : entity === 'tally' ? db.tallies : db.scenarios;
  await db.transaction('rw', table, db.outbox, async () => {
    for (const r of records) {
      if ((await db.outbox.where('entityId').equals(r.id).count()) > 0) continue;
      const local = await table.get(r.id);
      if (!local || Number(r.changeSeq) > Number(local.changeSeq)) await table.put(r);
    }
  });
}
