'use client';
/**
 * Tally-sheet uploads made offline wait here: a small Dexie database of its own ('ebbcast-uploads')
 * holding the file (a Blob) and what it belongs to, flushed to /api/uploads when the network is
 * back. Kept apart from the main database and the outbox because the push protocol is JSON; the
 * server recognises a retried upload by its clientId and stores it once.
 */
import Dexie, { type Table } from 'dexie';
import { checkSheetFile, SNIFF_BYTES } from '@/lib/validation/upload';

export interface QueuedSheet {
  /** The upload's id, made on the device (the server's clientId). */
  clientId: string;
  siteId: string;
  /** `YYYY-MM-DD`. */
  date: string;
  name: string;
  blob: Blob;
  /** Bytes. */
  size: number;
  queuedAt: string;
  attempts: number;
  /** Why the server refused it (kept for the person to see); null while waiting. */
  error: string | null;
}

class UploadDb extends Dexie {
  sheets!: Table<QueuedSheet, string>;
  constructor() {
    super('ebbcast-uploads');
    this.version(1).stores({ sheets: 'clientId, siteId, date, queuedAt' });
  }
}

let dbi: UploadDb | null = null;
const store = () => (dbi ??= new UploadDb());

type Listener = () => void;
const listeners = new Set<Listener>();
const notify = () => listeners.forEach((l) => l());

/** Called when the queue changes (to redraw a count). Returns the unsubscribe. */
export function onUploadQueueChange(l: Listener): () => void {
  listeners.add(l);
  return () => listeners.delete(l);
}

/** Checks a file as the server will (size, type from its bytes, name against bytes). */
export async function checkFile(file: File): Promise<ReturnType<typeof checkSheetFile>> {
  const head = new Uint8Array(await file.slice(0, SNIFF_BYTES).arrayBuffer());
  return checkSheetFile(file.name, file.size, head);
}

export async function queueSheet(entry: { clientId: string; siteId: string; date: string; file: File }): Promise<void> {
  await store().sheets.put({
    clientId: entry.clientId, siteId: entry.siteId, date: entry.date, name: entry.file.name, blob: entry.file, size: entry.file.size,
    queuedAt: new Date().toISOString(), attempts: 0, error: null,
  });
  notify();
}

export async function listQueuedSheets(filter: { siteId?: string; date?: string } = {}): Promise<QueuedSheet[]> {
  const all = await store().sheets.orderBy('queuedAt').toArray();
  return all.filter((s) => (!filter.siteId || s.siteId === filter.siteId) && (!filter.date || s.date === filter.date));
}

export async function removeQueuedSheet(clientId: string): Promise<void> {
  await store().sheets.delete(clientId);
  notify();
}

export type SendOutcome = { ok: true; sheet: unknown } | { ok: false; offline: true } | { ok: false; offline: false; status: number; message: string };

/** Sends one sheet as the form upload the server expects. */
export async function sendSheet(s: { clientId: string; siteId: string; date: string; name: string; blob: Blob }): Promise<SendOutcome> {
  const form = new FormData();
  form.set('clientId', s.clientId);
  form.set('siteId', s.siteId);
  form.set('date', s.date);
  form.set('file', s.blob, s.name);
  let res: Response;
  try {
    res = await fetch('/api/uploads', { method: 'POST', body: form, credentials: 'same-origin' });
  } catch {
    return { ok: false, offline: true };
  }
  const body = (await res.json().catch(() => null)) as { sheet?: unknown; error?: { message?: string } } | null;
  if (res.ok) return { ok: true, sheet: body?.sheet };
  // A 5xx or 401 may pass (server restarting, session to renew): keep it queued like an offline one.
  if (res.status >= 500 || res.status === 401) return { ok: false, offline: true };
  return { ok: false, offline: false, status: res.status, message: body?.error?.message ?? `The server answered ${res.status}.` };
}

let flushing: Promise<{ sent: number; failed: number }> | null = null;

/**
 * Sends every waiting sheet, oldest first; stops at the first network failure (the rest wait for
 * the next 'online'). A sheet the server refuses keeps its message and stays until removed.
 */
export function flushUploads(): Promise<{ sent: number; failed: number }> {
  if (flushing) return flushing;
  flushing = (async () => {
    let sent = 0;
    let failed = 0;
    for (const s of await listQueuedSheets()) {
      if (s.error) continue;
      const out = await sendSheet(s);
      if (out.ok) {
        await store().sheets.delete(s.clientId);
        sent++;
      } else if (out.offline) {
        await store().sheets.update(s.clientId, { attempts: s.attempts + 1 });
        break;
      } else {
        await store().sheets.update(s.clientId, { attempts: s.attempts + 1, error: out.message });
        failed++;
      }
    }
    notify();
    return { sent, failed };
  })().finally(() => {
    flushing = null;
  });
  return flushing;
}

let started = false;
/** Flushes now and on every return of the network. Safe to call from several components. */
export function startUploadSync(): void {
  if (started || typeof window === 'undefined') return;
  started = true;
  window.addEventListener('online', () => void flushUploads());
  if (navigator.onLine) void flushUploads();
}
