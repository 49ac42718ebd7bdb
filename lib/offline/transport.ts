'use client';
/** The sync Transport over fetch, with every failure as a SyncHttpError (status 0 = no answer). */
import { SyncHttpError, type Transport } from '@/lib/sync/engine';
import type { Mutation, PullResponse, PushResponse } from '@/lib/sync/protocol';

/** A push of 500 mutations takes well under a second here; a minute means the answer is lost. */
const TIMEOUT_MS = 60_000;

async function send<T>(url: string, init: RequestInit): Promise<T> {
  const ctl = new AbortController();
  const timer = setTimeout(() => ctl.abort(), TIMEOUT_MS);
  let res: Response;
  try {
    res = await fetch(url, { ...init, credentials: 'same-origin', cache: 'no-store', signal: ctl.signal });
  } catch {
    throw new SyncHttpError(0, 'offline', 'No connection to the server.');
  } finally {
    clearTimeout(timer);
  }
  let body: unknown = null;
  try {
    body = await res.json();
  } catch {
    body = null;
  }
  if (!res.ok) {
    const e = (body as { error?: { code?: string; message?: string } & Record<string, unknown> } | null)?.error;
    throw new SyncHttpError(res.status, e?.code ?? 'http_error', e?.message ?? `The server answered ${res.status}.`, e ?? undefined);
  }
  return body as T;
}

const json = (body: unknown): RequestInit => ({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });

export const fetchTransport: Transport = {
  async registerDevice(id, label) {
    await send('/api/devices', json({ id, label }));
  },
  push(body: { deviceId: string; mutations: Mutation[] }) {
    return send<PushResponse>('/api/sync/push', json(body));
  },
  pull(cursor, limit, deviceId) {
    return send<PullResponse>(`/api/sync/pull?cursor=${cursor}&limit=${limit}`, { headers: { 'x-device-id': deviceId } });
  },
};
