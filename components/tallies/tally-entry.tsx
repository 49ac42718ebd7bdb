'use client';
import { useEffect, useMemo, useRef, useState, type FormEvent } from 'react';
import { useOutbreak, useOutbreaks, useSites } from '@/lib/data/hooks';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { useMe } from '@/lib/data/use-me';
import { ApiError } from '@/lib/data/api';
import { saveTally, useReportingGrid, useTallies } from '@/lib/data/tallies';
import { useUiStore } from '@/lib/stores/ui';
import { addDays, localToday } from '@/lib/tallies/dates';
import { entryWarnings, type EntryWarning } from '@/lib/tallies/warnings';
import { EMPTY_FORM, parseTallyForm, type FormErrors, type TallyFormValues } from '@/lib/tallies/form';
import { may } from '@/lib/auth/permissions';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { TextField } from '@/components/ui/field';
import { CountStepper } from './count-stepper';

const OPTIONAL = [
  { name: 'recoveries', label: 'Recoveries' },
  { name: 'deaths', label: 'Deaths' },
  { name: 'admissions', label: 'Admissions' },
] as const;

const fromRecord = (t: { newCases: number; recoveries: number | null; deaths: number | null; admissions: number | null; note: string | null }): TallyFormValues => ({
  newCases: String(t.newCases), recoveries: t.recoveries == null ? '' : String(t.recoveries),
  deaths: t.deaths == null ? '' : String(t.deaths), admissions: t.admissions == null ? '' : String(t.admissions), note: t.note ?? '',
});

/** The daily entry form: one site, one day, a few big fields; Enter saves. */
export function TallyEntry() {
  const { me } = useMe();
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const { outbreak } = useOutbreak(outbreakId);
  const { sites: allSites } = useSites(outbreakId);
  const sites = useMemo(() => allSites.filter((s) => me && may(me, 'tally:write', { outbreakId: s.outbreakId, teamId: s.teamId })), [allSites, me]);
  const lastSiteId = useUiStore((s) => s.lastSiteId);
  const setLastSite = useUiStore((s) => s.setLastSite);
  const [siteId, setSiteId] = useState<string | null>(null);
  const [date, setDate] = useState(() => localToday());
  const [values, setValues] = useState<TallyFormValues>(EMPTY_FORM);
  const [errors, setErrors] = useState<FormErrors>({});
  const [warnings, setWarnings] = useState<EntryWarning[]>([]);
  const [saved, setSaved] = useState<string | null>(null);
  const [failure, setFailure] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const firstField = useRef<HTMLInputElement>(null);
  const nextAfterSave = useRef(false);

  useEffect(() => {
    if (siteId && sites.some((s) => s.id === siteId)) return;
    const remembered = sites.find((s) => s.id === lastSiteId);
    setSiteId((remembered ?? sites[0])?.id ?? null);
  }, [sites, siteId, lastSiteId]);

  const site = sites.find((s) => s.id === siteId);
  const prevDay = addDays(date, -1);
  const { rows, loading, reload } = useTallies(outbreakId && siteId ? outbreakId : null, { siteId: siteId ?? undefined, from: prevDay, to: date });
  const existing = rows.find((r) => r.date === date && r.siteId === siteId);
  const previous = rows.find((r) => r.date === prevDay && r.siteId === siteId);
  const { grid } = useReportingGrid(outbreakId, { from: date, to: date });
  const recordedToday = new Set(grid?.sites.filter((s) => s.dates[date] !== undefined).map((s) => s.siteId) ?? []);

  // Load the recorded tally of this site and day for editing (or clear the form for a new one).
  const loadedKey = `${siteId}|${date}|${existing?.id ?? ''}|${existing?.version ?? ''}`;
  useEffect(() => {
    if (loading) return;
    setValues(existing ? fromRecord(existing) : EMPTY_FORM);
    setErrors({});
    setWarnings([]);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [loadedKey, loading]);

  const chooseSite = (id: string) => {
    setSiteId(id);
    setLastSite(id);
    setSaved(null);
    setFailure(null);
  };

  const set = (k: keyof TallyFormValues) => (v: string) => {
    setValues((o) => ({ ...o, [k]: v }));
    setWarnings([]);
    if (errors[k]) setErrors((e) => ({ ...e, [k]: undefined }));
  };

  async function save(confirmed: boolean) {
    if (!site || !outbreak) return;
    setSaved(null);
    setFailure(null);
    const parsed = parseTallyForm(values, { id: existing?.id, siteId: site.id, date, baseVersion: existing?.version ?? null, today: localToday(), startDate: outbreak.startDate });
    if (!parsed.ok) {
      setErrors(parsed.errors);
      nextAfterSave.current = false;
      return;
    }
    setErrors({});
    const w = entryWarnings({ ...parsed.input, population: site.population, previousNewCases: previous?.newCases ?? null });
    if (w.length && !confirmed) {
      setWarnings(w);
      return;
    }
    setBusy(true);
    try {
      const r = await saveTally(parsed.input);
      setWarnings([]);
      const what = `${site.name}, ${date}: ${r.tally.newCases} new case${r.tally.newCases === 1 ? '' : 's'}`;
      setSaved(r.status === 'unchanged' ? `Already recorded — ${what}.` : `Saved — ${what}.`);
      if (nextAfterSave.current) {
        const i = sites.findIndex((s) => s.id === site.id);
        const next = sites[(i + 1) % sites.length];
        if (next) chooseSite(next.id);
        setSaved(r.status === 'unchanged' ? `Already recorded — ${what}.` : `Saved — ${what}.`);
      }
      firstField.current?.focus();
    } catch (err) {
      if (err instanceof ApiError && err.fields) setErrors(err.fields as FormErrors);
      // Someone else's tally for this site and day won: show it, so the person sees what was kept.
      if (err instanceof ApiError && err.status === 409) reload();
      setFailure(err instanceof Error ? err.message : 'The tally could not be saved.');
    } finally {
      setBusy(false);
      nextAfterSave.current = false;
    }
  }

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    void save(false);
  };

  if (!outbreak) return <p>Choose an outbreak to record tallies.</p>;
  if (me && !sites.length) return <Notice>You have no sites to record in this outbreak.</Notice>;
  const today = localToday();

  return (
    <div className="flex flex-col gap-4">
      <h1>Record tallies</h1>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Site</legend>
        <div className="flex flex-wrap gap-2" data-testid="site-picker">
          {sites.map((s) => (
            <button
              key={s.id} type="button" aria-pressed={s.id === siteId} onClick={() => chooseSite(s.id)}
              className={`flex min-h-14 items-center gap-2 rounded-lg border-2 px-4 text-lg font-bold ${s.id === siteId ? 'border-accent bg-accent text-white' : 'border-line bg-panel text-ink hover:border-accent'}`}
            >
              {s.name}
              {recordedToday.has(s.id) && <span aria-label="recorded for this day" title="Recorded for this day">✓</span>}
            </button>
          ))}
        </div>
      </fieldset>

      <Card>
        <form onSubmit={onSubmit} className="flex flex-col gap-4" aria-label="Tally" noValidate>
          <div className="flex flex-wrap items-end gap-3">
            <div className="w-56">
              <TextField label="Day" type="date" value={date} max={today} min={outbreak.startDate} error={errors.date}
                onChange={(e) => { setDate(e.target.value || today); setSaved(null); }} />
            </div>
            {date !== today && <Button variant="quiet" onClick={() => setDate(today)}>Back to today</Button>}
            <p className="pb-2 text-ink/80" data-testid="entry-status">
              {loading ? 'Looking for a tally of this day…' : existing
                ? <>Editing the tally recorded for this day (version <span className="num">{existing.version}</span>).</>
                : <>No tally yet for {site?.name} on this day.</>}
            </p>
          </div>

          <div className="grid gap-4 md:grid-cols-2">
            <CountStepper ref={firstField} name="newCases" label="New cases" value={values.newCases} onChange={set('newCases')} error={errors.newCases}
              hint={previous ? `Day before: ${previous.newCases}` : 'People seen with a new case today; 0 is a real answer.'} />
            {OPTIONAL.map((f) => (
              <CountStepper key={f.name} name={f.name} label={`${f.label} (if known)`} value={values[f.name]} onChange={set(f.name)} error={errors[f.name]} />
            ))}
          </div>
          <TextField label="Note (optional)" name="note" value={values.note} maxLength={280} error={errors.note}
            hint="About the count only. Never write names or patient details." onChange={(e) => set('note')(e.target.value)} />

          {warnings.length > 0 && (
            <div role="alertdialog" aria-label="Please check" className="rounded-lg border-2 border-warning bg-warning/10 p-3">
              <p className="font-bold">Please check before saving:</p>
              <ul className="ml-5 list-disc">{warnings.map((w) => <li key={w.code + w.field}>{w.message}</li>)}</ul>
              <div className="mt-2 flex flex-wrap gap-2">
                <Button variant="danger" onClick={() => void save(true)} disabled={busy}>Save anyway</Button>
                <Button variant="secondary" onClick={() => { setWarnings([]); firstField.current?.focus(); }}>Change the count</Button>
              </div>
            </div>
          )}
          {failure && <Notice tone="error">{failure}</Notice>}
          {saved && <Notice tone="success"><span data-testid="entry-saved">{saved}</span></Notice>}

          <div className="flex flex-wrap gap-3">
            <Button type="submit" size="lg" disabled={busy || !site}>{existing ? 'Save changes' : 'Save'}</Button>
            <Button type="submit" size="lg" variant="secondary" disabled={busy || !site} onClick={() => { nextAfterSave.current = true; }}>
              Save and next site
            </Button>
          </div>
          <p className="text-sm text-ink/70">Enter saves. Counts are for this site and day only.</p>
        </form>
      </Card>
    </div>
  );
}
