'use client';
import { useState } from 'react';
import type { SiteRecord, TallyRecord } from '@/lib/types/records';
import type { Actor } from '@/lib/auth/actor';
import { may } from '@/lib/auth/permissions';
import { removeTally, saveTally } from '@/lib/data/tallies';
import { parseTallyForm, type FormErrors, type TallyFormValues } from '@/lib/tallies/form';
import { localToday } from '@/lib/tallies/dates';
import { Button } from '@/components/ui/button';

export interface TallyTableProps {
  rows: TallyRecord[];
  sites: SiteRecord[];
  people: Record<string, string>;
  me: Actor | null;
  sort: string;
  onSort: (sort: string) => void;
  startDate: string;
}

// `wide`: shown from 1024 px up; on a portrait tablet the row's Edit button matters more than who
// recorded it and when (shown in landscape, from 1024 px).
const COLUMNS: { key: string | null; label: string; numeric?: boolean; wide?: boolean }[] = [
  { key: 'date', label: 'Day' },
  { key: 'site', label: 'Site' },
  { key: 'newCases', label: 'New cases', numeric: true },
  { key: null, label: 'Recoveries', numeric: true },
  { key: null, label: 'Deaths', numeric: true },
  { key: null, label: 'Admissions', numeric: true },
  { key: null, label: 'Note' },
  { key: 'recordedAt', label: 'Recorded', wide: true },
  { key: null, label: '' },
];

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString(undefined, { month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit' }) : '—');
const opt = (n: number | null) => (n == null ? '—' : n.toLocaleString());
const CELL = 'num w-20 rounded border-2 border-ink/30 bg-white px-2 py-1 text-right aria-[invalid=true]:border-warning';

/** The tallies, sortable by column, with inline edit and delete for those allowed to write the site. */
export function TallyTable({ rows, sites, people, me, sort, onSort, startDate }: TallyTableProps) {
  const siteById = new Map(sites.map((s) => [s.id, s]));
  const [editing, setEditing] = useState<string | null>(null);
  const [draft, setDraft] = useState<TallyFormValues>({ newCases: '', recoveries: '', deaths: '', admissions: '', note: '' });
  const [errors, setErrors] = useState<FormErrors>({});
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);

  const canWrite = (t: TallyRecord) => Boolean(me && may(me, 'tally:write', { outbreakId: t.outbreakId, teamId: siteById.get(t.siteId)?.teamId ?? null }));

  const startEdit = (t: TallyRecord) => {
    setEditing(t.id);
    setErrors({});
    setMessage(null);
    setDraft({ newCases: String(t.newCases), recoveries: t.recoveries == null ? '' : String(t.recoveries), deaths: t.deaths == null ? '' : String(t.deaths), admissions: t.admissions == null ? '' : String(t.admissions), note: t.note ?? '' });
  };

  const commit = async (t: TallyRecord) => {
    const parsed = parseTallyForm(draft, { id: t.id, siteId: t.siteId, date: t.date, baseVersion: t.version, today: localToday(), startDate });
    if (!parsed.ok) return setErrors(parsed.errors);
    try {
      await saveTally(parsed.input);
      setEditing(null);
      setMessage({ tone: 'ok', text: `Saved ${siteById.get(t.siteId)?.name ?? ''}, ${t.date}.` });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof Error ? err.message : 'Not saved.' });
    }
  };

  const remove = async (t: TallyRecord) => {
    const name = siteById.get(t.siteId)?.name ?? 'this site';
    if (!window.confirm(`Delete the tally of ${name} on ${t.date}? It is kept as deleted in the sync history.`)) return;
    try {
      await removeTally(t.id, t.version);
      setMessage({ tone: 'ok', text: `Deleted ${name}, ${t.date}.` });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof Error ? err.message : 'Not deleted.' });
    }
  };

  const sortButton = (key: string, label: string) => {
    const active = sort === key || sort === `-${key}`;
    const desc = sort === `-${key}`;
    return (
      <button type="button" className="flex min-h-touch items-center gap-1 font-bold" onClick={() => onSort(active && !desc ? `-${key}` : key)}
        aria-label={`Sort by ${label}`}>
        {label}<span aria-hidden>{active ? (desc ? '▼' : '▲') : '↕'}</span>
      </button>
    );
  };

  const field = (k: keyof TallyFormValues, label: string) => (
    <input aria-label={label} aria-invalid={Boolean(errors[k])} title={errors[k]} inputMode={k === 'note' ? 'text' : 'numeric'}
      className={k === 'note' ? 'w-40 rounded border-2 border-ink/30 bg-white px-2 py-1' : CELL}
      value={draft[k]} onChange={(e) => setDraft((d) => ({ ...d, [k]: e.target.value }))} />
  );

  return (
    <div className="flex flex-col gap-2">
      {message && <p role="status" className={message.tone === 'ok' ? 'font-bold text-susceptible' : 'font-bold text-warning'}>{message.text}</p>}
      {Object.values(errors).filter(Boolean).length > 0 && (
        <p role="alert" className="font-bold text-warning">{Object.entries(errors).filter(([, v]) => v).map(([k, v]) => `${k}: ${v}`).join(' · ')}</p>
      )}
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-left" data-testid="tally-table">
          <thead>
            <tr className="border-b-2 border-ink/40">
              {COLUMNS.map((c, i) => (
                <th key={i} scope="col" aria-sort={c.key && sort.replace('-', '') === c.key ? (sort.startsWith('-') ? 'descending' : 'ascending') : undefined}
                  className={`px-2 ${c.numeric ? 'text-right' : ''} ${c.wide ? 'hidden lg:table-cell' : ''}`}>
                  {c.key ? sortButton(c.key, c.label) : c.label}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map((t) => {
              const isEditing = editing === t.id;
              const site = siteById.get(t.siteId);
              return (
                <tr key={t.id} className="border-b border-line align-middle">
                  <td className="num px-2 py-2 whitespace-nowrap">{t.date}</td>
                  <td className="px-2">{site?.name ?? '—'}</td>
                  <td className="num px-2 text-right font-bold">{isEditing ? field('newCases', 'New cases') : t.newCases.toLocaleString()}</td>
                  <td className="num px-2 text-right">{isEditing ? field('recoveries', 'Recoveries') : opt(t.recoveries)}</td>
                  <td className="num px-2 text-right">{isEditing ? field('deaths', 'Deaths') : opt(t.deaths)}</td>
                  <td className="num px-2 text-right">{isEditing ? field('admissions', 'Admissions') : opt(t.admissions)}</td>
                  <td className="max-w-48 truncate px-2" title={t.note ?? undefined}>{isEditing ? field('note', 'Note') : t.note ?? ''}</td>
                  <td className="hidden px-2 text-sm lg:table-cell">
                    {people[t.recordedBy ?? ''] ?? '—'}<br /><span className="text-ink/70">{when(t.recordedAt)}</span>
                    {t.version > 1 && <><br /><span className="text-ink/70">edited by {people[t.updatedBy ?? ''] ?? '—'} (v{t.version})</span></>}
                  </td>
                  <td className="px-2 whitespace-nowrap">
                    {canWrite(t) && (isEditing ? (
                      <span className="flex gap-1">
                        <Button onClick={() => void commit(t)}>Save</Button>
                        <Button variant="secondary" onClick={() => setEditing(null)}>Cancel</Button>
                      </span>
                    ) : (
                      <span className="flex gap-1">
                        <Button variant="secondary" onClick={() => startEdit(t)} aria-label={`Edit ${site?.name ?? ''} ${t.date}`}>Edit</Button>
                        <Button variant="quiet" onClick={() => void remove(t)} aria-label={`Delete ${site?.name ?? ''} ${t.date}`}>Delete</Button>
                      </span>
                    ))}
                  </td>
                </tr>
              );
            })}
            {rows.length === 0 && (
              <tr><td colSpan={COLUMNS.length} className="px-2 py-4 text-ink/70">No tallies match these filters.</td></tr>
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}
