/**
 * A sync Transport that calls the real route handlers (push, pull, devices) the way Next does,
 * with a session cookie; used by the integration tests and the sync benchmark. Import
 * tests/helpers/server first (it points the database at a temporary file).
 */
import { call } from '../../helpers/server';
import { SyncHttpError, type Transport } from '@/lib/sync/engine';
import type { Mutation, PullResponse, PushResponse } from '@/lib/sync/protocol';

type Routes = {
  push: Parameters<typeof call>[0];
  pull: Parameters<typeof call>[0];
  devices: Parameters<typeof call>[0];
};

export async function loadRoutes(): Promise<Routes> {
  const push = await import('@/app/api/sync/push/route');
  const pull = await import('@/app/api/sync/pull/route');
  const devices = await import('@/app/api/devices/route');
  return { push: push.POST as Routes['push'], pull: pull.GET as Routes['pull'], devices: devices.POST as Routes['devices'] };
}

function fail(status: number, body: unknown): never {
  const e = (body as { error?: { code?: string; message?: string } & Record<string, unknown> } | null)?.error;
  throw new SyncHttpError(status, e?.code ?? 'http_error', e?.message ?? `HTTP ${status}`, e as Record<string, unknown> | undefined);
}

export function routeTransport(routes: Routes, cookie: () => string): Transport {
  return {
    async registerDevice(id, label) {
      const r = await call(routes.devices, '/api/devices', { method: 'POST', cookie: cookie(), body: { id, label } });
      if (r.status !== 200) fail(r.status, r.body);
    },
    async push(body: { deviceId: string; mutations: Mutation[] }): Promise<PushResponse> {
      const r = await call(routes.push, '/api/sync/push', { method: 'POST', cookie: cookie(), body });
      if (r.status !== 200) fail(r.status, r.body);
      return r.body as PushResponse;
    },
    async pull(cursor, limit, deviceId): Promise<PullResponse> {
      const r = await call(routes.pull, `/api/sync/pull?cursor=${cursor}&limit=${limit}`, { cookie: cookie(), headers: { 'x-device-id': deviceId } });
      if (r.status !== 200) fail(r.status, r.body);
      return r.body as PullResponse;
    },
  };
}
