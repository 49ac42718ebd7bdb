'use client';
import { useState } from 'react';
import { useOutbreak, useOutbreaks, useSites } from '@/lib/data/hooks';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { useMe } from '@/lib/data/use-me';
import { exportTalliesUrl, useEpiCurve, useReportingGrid, useTallies } from '@/lib/data/tallies';
import { roleMay } from '@/lib/auth/roles';
import { addDays, localToday } from '@/lib/tallies/dates';
import { EpiCurveChart } from '@/components/charts/epi-curve';
import { Card } from '@/components/ui/card';
import { SelectField, TextField } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { TallyTable } from './tally-table';
import { ReportingGrid } from './reporting-grid';
import { CsvImport } from './csv-import';

const PAGE = 50;
type View = 'table' | 'grid' | 'import';

/** Tallies of an outbreak: the epi curve, the table (filter, sort, edit, export), the completeness grid and CSV import. */
export function TalliesScreen() {
  const { me } = useMe();
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const { outbreak } = useOutbreak(outbreakId);
  const { sites } = useSites(outbreakId);
  const [curveSite, setCurveSite] = useState('');
  const [siteId, setSiteId] = useState('');
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  const [sort, setSort] = useState('-date');
  const [page, setPage] = useState(0);
  const [view, setView] = useState<View>('table');
  const filter = { siteId: siteId || undefined, from: from || undefined, to: to || undefined };
  const { curve } = useEpiCurve(outbreakId, curveSite || null);
  const { rows, total, people, loading } = useTallies(outbreakId, { ...filter, sort, limit: PAGE, offset: page * PAGE });
  const today = localToday();
  const { grid } = useReportingGrid(view === 'grid' ? outbreakId : null, { from: addDays(today, -20), to: today });
  const canImport = me ? roleMay(me.role, 'tally:import') : false;
  const showGrid = me ? me.role !== 'field' : false;

  if (!outbreak || !outbreakId) return <p>Choose an outbreak.</p>;
  const siteOptions = [{ value: '', label: me?.role === 'field' ? 'All my sites' : 'All sites' }, ...sites.map((s) => ({ value: s.id, label: s.name }))];
  const pages = Math.max(1, Math.ceil(total / PAGE));
  const views: { key: View; label: string; show: boolean }[] = [
    { key: 'table', label: 'Table', show: true },
    { key: 'grid', label: 'Site-by-day grid', show: showGrid },
    { key: 'import', label: 'Import CSV', show: canImport },
  ];
  const shown = views.filter((v) => v.show);

  return (
    <div className="flex flex-col gap-4">
      <h1>Tallies &amp; curve · {outbreak.name}</h1>
      <Card title="Epi curve" actions={
        <div className="w-56"><SelectField label="Curve of" value={curveSite} options={siteOptions} onChange={(e) => setCurveSite(e.target.value)} /></div>
      }>
        {curve ? <EpiCurveChart curve={curve} scopeLabel={sites.find((s) => s.id === curveSite)?.name ?? 'all sites'} /> : <p>Loading the curve…</p>}
      </Card>

      {shown.length > 1 && <div role="tablist" aria-label="Views" className="flex flex-wrap gap-2">
        {shown.map((v) => (
          <button key={v.key} role="tab" type="button" aria-selected={view === v.key} onClick={() => setView(v.key)}
            className={`min-h-touch rounded-lg border-2 px-4 font-bold ${view === v.key ? 'border-accent bg-accent text-white' : 'border-line bg-panel'}`}>
            {v.label}
          </button>
        ))}
      </div>}

      {view === 'table' && (
        <Card title={`Tallies (${total.toLocaleString()})`} actions={
          <a className="inline-flex min-h-touch items-center rounded-lg border-2 border-ink/30 bg-panel px-4 font-bold text-ink no-underline hover:border-ink"
            href={exportTalliesUrl(outbreakId, filter)} download data-testid="export-csv">Export CSV</a>
        }>
          <div className="mb-3 grid gap-3 sm:grid-cols-4">
            <SelectField label="Site" value={siteId} options={siteOptions} onChange={(e) => { setSiteId(e.target.value); setPage(0); }} />
            <TextField label="From" type="date" value={from} onChange={(e) => { setFrom(e.target.value); setPage(0); }} />
            <TextField label="To" type="date" value={to} onChange={(e) => { setTo(e.target.value); setPage(0); }} />
            <div className="flex items-end">
              <Button variant="quiet" onClick={() => { setSiteId(''); setFrom(''); setTo(''); setPage(0); }}>Clear filters</Button>
            </div>
          </div>
          <TallyTable rows={rows} sites={sites} people={people} me={me} sort={sort} onSort={(s) => { setSort(s); setPage(0); }} startDate={outbreak.startDate} />
          <div className="mt-3 flex items-center gap-3">
            <Button variant="secondary" disabled={page === 0 || loading} onClick={() => setPage((p) => p - 1)}>Previous</Button>
            <span className="num">Page {page + 1} of {pages}</span>
            <Button variant="secondary" disabled={page + 1 >= pages || loading} onClick={() => setPage((p) => p + 1)}>Next</Button>
          </div>
        </Card>
      )}
      {view === 'grid' && showGrid && (
        <Card title="Which sites reported, the last 3 weeks">{grid ? <ReportingGrid grid={grid} /> : <p>Loading…</p>}</Card>
      )}
      {view === 'import' && canImport && (
        <Card title="Import tallies from CSV"><CsvImport outbreakId={outbreakId} /></Card>
      )}
    </div>
  );
}
