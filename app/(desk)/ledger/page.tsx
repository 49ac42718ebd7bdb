import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { ledgerNames, listLedgerForActor } from '@/lib/db/ledger';
import { listOutbreaksForActor } from '@/lib/db/outbreaks';
import { listDevices } from '@/lib/db/sync';
import { listUsers } from '@/lib/db/users';
import { ledgerQuerySchema } from '@/lib/validation/sync';
import { LedgerVerify } from '@/components/sync/ledger-verify';
import { OnlineOnlyNotice } from '@/components/sync/online-only';

export const metadata: Metadata = { title: 'Sync ledger' };
export const dynamic = 'force-dynamic';

type SP = Promise<Record<string, string | string[] | undefined>>;
const PAGE = 200;

/** The stored kinds, with words for the screen (the filter's values and the CSV export keep the kinds). */
const KIND_LABEL: Record<string, string> = {
  push: 'Push', pull: 'Pull', conflict: 'Conflict', settlement: 'Settlement', sign_in: 'Sign-in',
  'device.register': 'Device registered', tally_import: 'CSV import', 'forecast.publish': 'Forecast published',
};
const KINDS = Object.keys(KIND_LABEL);
/** Rendered on the server: one clock for every reader, said in the column's heading. */
const utc = (iso: string) => new Date(iso).toISOString().slice(0, 19).replace('T', ' ');

function countsText(c: Record<string, number> | null, kind: string): string {
  if (!c) return '';
  if (kind === 'push') return `${c.applied ?? 0} applied · ${c.duplicate ?? 0} dup · ${c.conflict ?? 0} conflict · ${c.rejected ?? 0} rejected${c.resent ? ` · ${c.resent} resent` : ''}`;
  if (kind === 'pull') return `${c.changes ?? 0} changes`;
  return Object.entries(c).map(([k, v]) => `${v} ${k}`).join(' · ');
}

function detailText(d: Record<string, unknown> | null): string {
  if (!d) return '';
  const parts: string[] = [];
  if (typeof d.settlement === 'string') parts.push(`${d.settlement.replace('_', ' ')}: “${String(d.reason ?? '')}”`);
  else if (typeof d.reason === 'string') parts.push(d.reason.replace('_', ' '));
  if (d.firstSeq != null) parts.push(`seq ${String(d.firstSeq)}–${String(d.lastSeq)}`);
  if (d.from != null && d.to != null) parts.push(`cursor ${String(d.from)}→${String(d.to)}`);
  if (typeof d.label === 'string') parts.push(d.label);
  return parts.join('; ');
}

/** The append-only sync ledger: supervisors read and export it; coordinators read it. Online only. */
export default async function LedgerPage({ searchParams }: { searchParams: SP }) {
  const actor = await getActor();
  if (!actor || !may(actor, 'ledger:read')) return <NotAllowed what="the sync ledger" />;
  const raw = Object.fromEntries(Object.entries(await searchParams).filter(([, v]) => typeof v === 'string' && v !== '')) as Record<string, string>;
  const parsed = ledgerQuerySchema.safeParse(raw);
  const q = parsed.success ? parsed.data : {};
  const offset = q.offset ?? 0;
  const [{ rows, total }, outbreaks, users, devices] = await Promise.all([
    listLedgerForActor(actor, { ...q, limit: PAGE, offset }),
    listOutbreaksForActor(actor),
    listUsers(),
    listDevices(actor),
  ]);
  const names = await ledgerNames(rows);
  const outbreakName = Object.fromEntries(outbreaks.map((o) => [o.id, o.name]));
  const qs = (over: Record<string, string | number | undefined>) => {
    const p = new URLSearchParams();
    for (const [k, v] of Object.entries({ ...raw, ...over })) if (v !== undefined && v !== '' && k !== 'limit') p.set(k, String(v));
    return p.toString();
  };
  const exportable = may(actor, 'ledger:export');
  const select = 'min-h-touch rounded-lg border-2 border-ink/30 bg-white px-2';
  return (
    <div className="flex flex-col gap-4">
      <OnlineOnlyNotice what="the sync ledger" />
      <h1>Sync ledger</h1>
      <p className="text-ink/80">Every push, pull, conflict, settlement and sign-in, in the order it happened. Rows are only ever added; each carries a hash of the one before.</p>
      <form method="get" className="flex flex-wrap items-end gap-3 rounded-xl border border-line bg-panel p-3" data-testid="ledger-filters">
        <label className="flex flex-col text-sm font-bold">User
          <select name="user" defaultValue={raw.user ?? ''} className={select}>
            <option value="">Everyone</option>
            {users.map((u) => <option key={u.id} value={u.id}>{u.name}</option>)}
          </select>
        </label>
        <label className="flex flex-col text-sm font-bold">Device
          <select name="device" defaultValue={raw.device ?? ''} className={select}>
            <option value="">Any device</option>
            {devices.map((d) => <option key={d.id} value={d.id}>{d.label} · {d.id.slice(0, 8)}</option>)}
          </select>
        </label>
        <label className="flex flex-col text-sm font-bold">Outbreak
          <select name="outbreak" defaultValue={raw.outbreak ?? ''} className={select}>
            <option value="">All of mine</option>
            {outbreaks.map((o) => <option key={o.id} value={o.id}>{o.name}</option>)}
          </select>
        </label>
        <label className="flex flex-col text-sm font-bold">Kind
          <select name="kind" defaultValue={raw.kind ?? ''} className={select}>
            <option value="">Any</option>
            {KINDS.map((k) => <option key={k} value={k}>{KIND_LABEL[k]}</option>)}
          </select>
        </label>
        <label className="flex flex-col text-sm font-bold">From
          <input type="date" name="from" defaultValue={raw.from ?? ''} className={select} />
        </label>
        <label className="flex flex-col text-sm font-bold">To
          <input type="date" name="to" defaultValue={raw.to ?? ''} className={select} />
        </label>
        <button type="submit" className="min-h-touch rounded-lg bg-accent px-4 font-bold text-white">Filter</button>
        {exportable && (
          <a href={`/api/ledger/export?${qs({ offset: undefined })}`} data-testid="ledger-export" className="inline-flex min-h-touch items-center rounded-lg border-2 border-accent px-4 font-bold text-accent no-underline">
            Export CSV
          </a>
        )}
      </form>
      {!parsed.success && <p role="alert" className="font-bold text-warning">Some filters were not understood and were ignored.</p>}
      <LedgerVerify />
      <p className="num text-sm">{total.toLocaleString()} rows{total > PAGE ? `, showing ${offset + 1}–${Math.min(offset + PAGE, total)}` : ''}</p>
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm" data-testid="ledger-table">
          <thead>
            <tr className="border-b-2 border-line">
              <th className="py-1 pr-2">#</th><th className="pr-2">When (UTC)</th><th className="pr-2">What</th><th className="pr-2">User</th>
              <th className="pr-2">Device</th><th className="pr-2">Outbreak</th><th className="pr-2">Counts</th><th className="pr-2">ms</th><th>Detail</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} className="border-b border-line/60 align-top" data-kind={r.kind}>
                <td className="py-1 pr-2">{r.id}</td>
                <td className="num whitespace-nowrap pr-2">{utc(r.at)}</td>
                <td className="pr-2 font-bold">{KIND_LABEL[r.kind] ?? r.kind}</td>
                <td className="pr-2">{r.userId ? (names.users[r.userId] ?? r.userId.slice(0, 8)) : '—'}</td>
                <td className="pr-2">{r.deviceId ? (names.devices[r.deviceId] ?? r.deviceId.slice(0, 8)) : '—'}</td>
                <td className="pr-2">{r.outbreakId ? (outbreakName[r.outbreakId] ?? r.outbreakId.slice(0, 8)) : '—'}</td>
                <td className="pr-2">{countsText(r.counts, r.kind)}</td>
                <td className="pr-2">{r.durationMs ?? ''}</td>
                <td>{detailText(r.detail)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="flex gap-3">
        {offset > 0 && <a href={`/ledger?${qs({ offset: Math.max(0, offset - PAGE) })}`} className="font-bold text-accent">Newer</a>}
        {offset + PAGE < total && <a href={`/ledger?${qs({ offset: offset + PAGE })}`} className="font-bold text-accent">Older</a>}
      </div>
    </div>
  );
}
