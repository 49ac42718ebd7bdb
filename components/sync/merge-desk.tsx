'use client';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { ConflictView } from '@/lib/db/conflicts';
import { apiFetch, ApiError } from '@/lib/data/api';
import { settleConflictSchema, type Settlement } from '@/lib/validation/sync';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';

const REASON: Record<string, string> = {
  duplicate_day: 'Two devices recorded the same site and day',
  stale_version: 'Changed on a device that had not seen the latest version',
  edit_deleted: 'Edited on a device after it was deleted elsewhere',
};

const SETTLE_LABEL: Record<Settlement, string> = {
  keep_current: 'Keep the server value',
  keep_incoming: 'Take the incoming value',
  sum: 'Add them up',
  corrected: 'Enter a corrected value',
};

type Values = { newCases?: unknown; recoveries?: unknown; deaths?: unknown; admissions?: unknown; note?: unknown };

const show = (v: unknown) => (v === null || v === undefined || v === '' ? '—' : String(v));
const when = (iso: string | null | undefined) => (iso ? new Date(iso).toLocaleString() : '—');

function ValueTable({ v, deleted, testId }: { v: Values | null; deleted?: boolean; testId: string }) {
  if (deleted || !v) return <p className="font-bold text-warning" data-testid={testId}>{deleted ? 'Deleted' : 'Delete this tally'}</p>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-3 text-lg" data-testid={testId}>
      <dt>New cases</dt><dd className="num text-2xl font-bold">{show(v.newCases)}</dd>
      <dt>Recoveries</dt><dd className="num">{show(v.recoveries)}</dd>
      <dt>Deaths</dt><dd className="num">{show(v.deaths)}</dd>
      <dt>Admissions</dt><dd className="num">{show(v.admissions)}</dd>
      {v.note ? (<><dt>Note</dt><dd>{show(v.note)}</dd></>) : null}
    </dl>
  );
}

function ConflictCard({ c, onDone }: { c: ConflictView; onDone: (msg: string) => void }) {
  const [settlement, setSettlement] = useState<Settlement>('keep_current');
  const [reason, setReason] = useState('');
  const [corrected, setCorrected] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);
  const incomingDelete = c.incoming.op === 'delete';
  const live = c.live;
  const settle = async () => {
    const body = {
      settlement, reason, conflictVersion: c.version, currentVersion: live ? live.version : null,
      ...(settlement === 'corrected' ? { corrected: { newCases: corrected === '' ? Number.NaN : Number(corrected) } } : {}),
    };
    const parsed = settleConflictSchema.safeParse(body);
    if (!parsed.success) {
      const f: Record<string, string> = {};
      for (const i of parsed.error.issues) f[i.path.join('.')] ??= i.message;
      setFieldErrors(f);
      return;
    }
    setFieldErrors({});
    setBusy(true);
    setError(null);
    try {
      await apiFetch(`/api/conflicts/${c.id}/settle`, { method: 'POST', json: parsed.data });
      onDone(`Settled: ${c.siteName ?? 'tally'} ${c.date ?? ''} — ${SETTLE_LABEL[settlement].toLowerCase()}.`);
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'The settlement did not reach the server.');
    } finally {
      setBusy(false);
    }
  };
  const settled = c.status === 'settled';
  return (
    <div data-testid="conflict-card" data-conflict-id={c.id}>
    <Card title={<span>{c.siteName ?? 'Unknown site'} · {c.date ?? '—'}</span>} className="flex flex-col gap-3">
      <div className="flex flex-col gap-3">
        <p className="text-ink/80">{REASON[c.reason] ?? c.reason}. Raised {when(c.createdAt)}.</p>
        <div className="grid gap-3 md:grid-cols-2">
          <section className="rounded-lg border-2 border-line p-3" aria-label="On the server now">
            <h3 className="font-bold">On the server now {live ? <span className="num text-sm font-normal">(version {live.version})</span> : null}</h3>
            <p className="text-sm text-ink/70">
              by {c.liveByName ?? 'unknown'}{c.liveDeviceLabel ? ` on ${c.liveDeviceLabel}` : ''}, {when(live?.updatedAt)}
            </p>
            <ValueTable v={live as Values | null} deleted={Boolean(live?.deletedAt)} testId="conflict-current" />
          </section>
          <section className="rounded-lg border-2 border-exposed p-3" aria-label="Incoming">
            <h3 className="font-bold">Incoming</h3>
            <p className="text-sm text-ink/70">
              by {c.userName ?? 'unknown'}{c.deviceLabel ? ` on ${c.deviceLabel}` : ''}, recorded {when(c.recordedAt)}
            </p>
            <ValueTable v={incomingDelete ? null : (c.incoming as Values)} testId="conflict-incoming" />
          </section>
        </div>
        {settled ? (
          <p data-testid="conflict-settled">
            Settled by {c.settledByName ?? 'a coordinator'} on {when(c.settledAt)}: <b>{SETTLE_LABEL[(c.settlement ?? 'keep_current') as Settlement] ?? c.settlement}</b> — “{c.settleReason}”
          </p>
        ) : (
          <fieldset className="flex flex-col gap-2" disabled={busy}>
            <legend className="font-bold">Settle</legend>
            <div className="flex flex-wrap gap-2">
              {(Object.keys(SETTLE_LABEL) as Settlement[]).map((s) => (
                <label key={s} className={`flex min-h-touch cursor-pointer items-center gap-2 rounded-lg border-2 px-3 ${settlement === s ? 'border-accent bg-accent/10' : 'border-line'}`}>
                  <input type="radio" name={`settle-${c.id}`} value={s} checked={settlement === s} onChange={() => setSettlement(s)} />
                  {SETTLE_LABEL[s]}
                </label>
              ))}
            </div>
            {settlement === 'corrected' && (
              <label className="flex flex-col gap-1">
                <span className="font-bold">Corrected new cases</span>
                <input type="number" inputMode="numeric" min={0} value={corrected} onChange={(e) => setCorrected(e.target.value)}
                  aria-invalid={Boolean(fieldErrors['corrected.newCases'])}
                  className="min-h-touch w-40 rounded-lg border-2 border-ink/30 bg-white px-3 text-lg" />
                {fieldErrors['corrected.newCases'] && <span role="alert" className="text-sm font-bold text-warning">{fieldErrors['corrected.newCases']}</span>}
              </label>
            )}
            <label className="flex flex-col gap-1">
              <span className="font-bold">Why (kept with the new version and in the sync ledger)</span>
              <textarea value={reason} onChange={(e) => setReason(e.target.value)} rows={2} maxLength={500}
                aria-invalid={Boolean(fieldErrors.reason)}
                className="rounded-lg border-2 border-ink/30 bg-white p-2" />
              {fieldErrors.reason && <span role="alert" className="text-sm font-bold text-warning">{fieldErrors.reason}</span>}
            </label>
            {error && <Notice tone="error">{error} <button type="button" className="font-bold text-accent underline" onClick={() => window.location.reload()}>Reload</button></Notice>}
            <div><Button onClick={settle} data-testid="settle">{busy ? 'Settling…' : 'Settle'}</Button></div>
          </fieldset>
        )}
      </div>
    </Card>
    </div>
  );
}

/** The merge desk: conflicts of one outbreak side by side, settled one by one with a reason. */
export function MergeDesk({ outbreak, conflicts, show: showing }: { outbreak: { id: string; name: string }; conflicts: ConflictView[]; show: 'open' | 'settled' }) {
  const router = useRouter();
  const [done, setDone] = useState<string | null>(null);
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h1>Merge desk · {outbreak.name}</h1>
        <div className="flex gap-2">
          <Link href={`/merge?outbreak=${outbreak.id}`} aria-current={showing === 'open' ? 'page' : undefined} className="min-h-touch rounded-lg border-2 border-line px-3 py-2 font-bold no-underline">Open</Link>
          <Link href={`/merge?outbreak=${outbreak.id}&show=settled`} aria-current={showing === 'settled' ? 'page' : undefined} className="min-h-touch rounded-lg border-2 border-line px-3 py-2 font-bold no-underline">Settled</Link>
          <Link href="/ledger" className="min-h-touch rounded-lg border-2 border-line px-3 py-2 font-bold no-underline">Sync ledger</Link>
        </div>
      </div>
      <p className="text-ink/80">
        Nothing here is thrown away: the server keeps its value until you settle, and each settlement becomes a new version that
        reaches every device at its next sync.
      </p>
      {done && <Notice tone="success">{done}</Notice>}
      {conflicts.length === 0 ? (
        <p data-testid="no-conflicts">{showing === 'open' ? 'No open conflicts. Every device agrees.' : 'No settled conflicts yet.'}</p>
      ) : (
        conflicts.map((c) => (
          <ConflictCard key={c.id} c={c} onDone={(m) => { setDone(m); router.refresh(); }} />
        ))
      )}
    </div>
  );
}
