'use client';
import Link from 'next/link';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { ago } from '@/components/shell/status-indicator';
import { useConnectivity } from '@/lib/stores/connectivity';
import { loadSync } from '@/lib/offline/lazy';
import { useSyncStatus } from '@/lib/offline/sync-status';
import { useLive } from '@/lib/offline/use-live';
import type { OutboxEntry } from '@/lib/sync/engine';
import type { Fate } from '@/lib/sync/protocol';

const FATE_TEXT: Record<Fate, string> = {
  applied: 'Applied',
  duplicate: 'Already there',
  conflict: 'Sent to the merge desk',
  rejected: 'Refused',
};
const FATE_STYLE: Record<Fate, string> = {
  applied: 'bg-susceptible/15 text-ink',
  duplicate: 'bg-line text-ink',
  conflict: 'bg-exposed/20 text-ink',
  rejected: 'bg-warning/15 text-warning',
};

const REASON_TEXT: Record<string, string> = {
  duplicate_day: 'another device recorded this site and day',
  stale_version: 'someone changed it since this device last saw it',
  edit_deleted: 'it was deleted on another device',
  same_values: 'the same count was already recorded',
  forbidden: 'not a site of your team',
  not_found: 'the record is not on the server',
  validation_failed: 'the values are not valid',
  entity_not_supported: 'the server does not sync this kind of record',
};

function describe(e: { entity: string; payload?: Record<string, unknown> | null; entityId: string }, sites: Map<string, string>): string {
  const p = e.payload ?? {};
  if (e.entity === 'tally') {
    const site = typeof p.siteId === 'string' ? (sites.get(p.siteId) ?? 'a site') : 'a tally';
    return p.date ? `${site}, ${String(p.date)}: ${String(p.newCases)} new cases` : `tally ${e.entityId.slice(0, 8)}`;
  }
  if (e.entity === 'scenario') return `scenario “${String(p.name ?? e.entityId.slice(0, 8))}”`;
  return `${e.entity} ${e.entityId.slice(0, 8)}`;
}

/** The sync page: what waits in the outbox, the last answers, and "Sync now". Works offline. */
export function SyncScreen() {
  const { online, outboxSize, lastSyncAt, syncing, lastError } = useConnectivity();
  const status = useSyncStatus();
  const [busy, setBusy] = useState(false);
  const outbox = useLive((db) => db.outbox.orderBy('seq').limit(200).toArray(), []) ?? [];
  const results = useLive((db) => db.results.orderBy('at').reverse().limit(50).toArray(), []) ?? [];
  const rejected = useLive((db) => db.rejected.orderBy('at').reverse().limit(50).toArray(), []) ?? [];
  const siteRows = useLive((db) => db.sites.toArray(), []) ?? [];
  const sites = new Map(siteRows.map((s) => [s.id, String(s.name)]));
  const payloadOf = new Map<string, OutboxEntry['payload']>(outbox.map((o) => [o.mutationId, o.payload]));
  const report = status.lastReport;

  const onSync = async () => {
    setBusy(true);
    try {
      await (await loadSync()).syncNow();
    } finally {
      setBusy(false);
    }
  };

  return (
    <div className="flex flex-col gap-4">
      <h1>Sync</h1>
      {status.needsSignIn && (
        <Notice tone="error">
          <p className="font-bold">Sign in to sync.</p>
          <p>Your session has ended. Everything you recorded is kept on this device and will sync after you sign in.</p>
          <Link href="/signin?callbackUrl=%2Fsync" className="font-bold text-accent">Sign in</Link>
        </Notice>
      )}
      {status.otherUserPending && (
        <Notice tone="caution">This device holds unsynced changes of another user. They stay here and sync when that user signs in.</Notice>
      )}
      <Card title="This device">
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
          <dt className="font-bold">Network</dt>
          <dd data-testid="sync-online">{online ? 'Online' : 'Offline — changes wait in the outbox'}</dd>
          <dt className="font-bold">Outbox</dt>
          <dd className="num" data-testid="sync-outbox-size">{outboxSize} change{outboxSize === 1 ? '' : 's'} waiting</dd>
          <dt className="font-bold">Last sync</dt>
          <dd data-testid="sync-last">{syncing ? 'syncing now…' : lastSyncAt ? `${ago(lastSyncAt)} (${new Date(lastSyncAt).toLocaleString()})` : 'never'}</dd>
          {status.nextRetryAt && !syncing && (
            <>
              <dt className="font-bold">Next try</dt>
              <dd>{new Date(status.nextRetryAt).toLocaleTimeString()}</dd>
            </>
          )}
          <dt className="font-bold">Device id</dt>
          <dd className="num break-all text-sm">{status.deviceId ?? '…'}</dd>
          <dt className="font-bold">Storage</dt>
          <dd className="text-sm">{status.persisted ? 'kept by the browser (persistent)' : 'may be cleared by the browser when space runs low'}</dd>
        </dl>
        <div className="mt-3 flex flex-wrap items-center gap-3">
          <Button onClick={onSync} disabled={busy || syncing || !online} data-testid="sync-now">{busy || syncing ? 'Syncing…' : 'Sync now'}</Button>
          {!online && <span className="text-sm">Sync starts by itself when the network returns.</span>}
        </div>
        {report && (
          <p className="mt-3" data-testid="sync-report" role="status">
            {report.ok
              ? `Last run: ${report.pushed.applied} applied, ${report.pushed.duplicate} already there, ${report.pushed.conflict} to the merge desk, ${report.pushed.rejected} refused; ${report.pulled} changes received.`
              : `Last run did not finish: ${report.message ?? lastError ?? report.error}`}
          </p>
        )}
      </Card>

      <Card title={`Outbox (${outboxSize})`}>
        {outbox.length === 0 ? (
          <p data-testid="outbox-empty">Nothing waiting: every change on this device has reached the server.</p>
        ) : (
          <table className="w-full text-left" data-testid="outbox-table">
            <thead>
              <tr className="border-b border-line"><th className="py-1">#</th><th>Change</th><th>Recorded</th><th>Tries</th></tr>
            </thead>
            <tbody>
              {outbox.map((o) => (
                <tr key={o.seq} className="border-b border-line/60">
                  <td className="py-1">{o.seq}</td>
                  <td>{o.op === 'delete' ? 'Delete ' : ''}{describe(o, sites)}</td>
                  <td>{new Date(o.recordedAt).toLocaleString()}</td>
                  <td>{o.attempts}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>

      <Card title="Last answers from the server">
        {results.length === 0 ? (
          <p>No sync answers on this device yet.</p>
        ) : (
          <ul className="flex flex-col gap-1" data-testid="sync-results">
            {results.map((r) => (
              <li key={r.mutationId} className="flex flex-wrap items-center gap-2">
                <span className={`rounded px-2 py-0.5 text-sm font-bold ${FATE_STYLE[r.result.fate]}`}>{FATE_TEXT[r.result.fate]}</span>
                <span>{describe({ entity: r.entity, entityId: r.entityId, payload: payloadOf.get(r.mutationId) ?? (r.result.record as Record<string, unknown> | null) }, sites)}</span>
                {r.result.reason && <span className="text-sm text-ink/70">— {REASON_TEXT[r.result.reason] ?? r.result.reason}</span>}
              </li>
            ))}
          </ul>
        )}
      </Card>

      {rejected.length > 0 && (
        <Card title="Refused by the server">
          <p className="mb-2 text-sm">These changes were not applied; they are kept here so that nothing typed is lost.</p>
          <ul className="flex flex-col gap-1" data-testid="sync-rejected">
            {rejected.map((r) => (
              <li key={r.mutationId}>{describe(r, sites)} — {REASON_TEXT[r.reason] ?? r.reason}</li>
            ))}
          </ul>
        </Card>
      )}
    </div>
  );
}
