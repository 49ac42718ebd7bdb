'use client';
import { useState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { formatDay } from '@/lib/mail/format';
import { TallySheetLink, type TallySheetSummary } from './tally-sheet-link';
import { TallySheetUpload } from './tally-sheet-upload';

export interface SheetRow extends TallySheetSummary {
  siteName: string;
  /** The live tally's new cases for that site and day; null when there is no tally. */
  newCases: number | null;
}

/** Paper sheets beside the counts they back, and (for those who record) an upload for a site and day. */
export function SheetsDesk({ rows, sites, canUpload, today }: { rows: SheetRow[]; sites: { id: string; name: string }[]; canUpload: boolean; today: string }) {
  const [siteId, setSiteId] = useState(sites[0]?.id ?? '');
  const [date, setDate] = useState(today);
  return (
    <div className="flex flex-col gap-4">
      <h1>Tally sheets</h1>
      {canUpload && sites.length > 0 && (
        <section className="flex flex-col gap-3 rounded-xl border border-line bg-panel p-4" aria-label="Attach a sheet">
          <div className="grid gap-3 sm:grid-cols-2">
            <SelectField label="Site" value={siteId} onChange={(e) => setSiteId(e.target.value)} options={sites.map((s) => ({ value: s.id, label: s.name }))} />
            <TextField label="Day" type="date" value={date} max={today} onChange={(e) => setDate(e.target.value)} />
          </div>
          {siteId && date && <TallySheetUpload key={`${siteId}|${date}`} siteId={siteId} date={date} />}
        </section>
      )}
      <div className="overflow-x-auto rounded-xl border border-line bg-panel">
        <table className="w-full text-left" data-testid="sheets-table">
          <thead className="border-b border-line"><tr><th className="p-2">Day</th><th className="p-2">Site</th><th className="p-2 text-right">New cases (tally)</th><th className="p-2">Sheet</th><th className="p-2">Sent by</th></tr></thead>
          <tbody>
            {rows.length === 0 && <tr><td colSpan={5} className="p-3 text-ink/70">No sheets attached yet.</td></tr>}
            {rows.map((r) => (
              <tr key={r.id} className="border-b border-line/60">
                <td className="p-2">{formatDay(r.date)}</td><td className="p-2 font-bold">{r.siteName}</td>
                <td className="num p-2 text-right">{r.newCases ?? '—'}</td>
                <td className="p-2"><TallySheetLink siteId={r.siteId} date={r.date} sheets={[r]} /></td>
                <td className="p-2">{r.uploadedByName ?? '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
