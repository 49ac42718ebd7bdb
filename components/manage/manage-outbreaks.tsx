'use client';
import { useState, type FormEvent } from 'react';
import type { z } from 'zod';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { outbreakInputSchema, siteInputSchema, teamInputSchema, SITE_KINDS } from '@/lib/validation/outbreak';
import { apiFetch, ApiError } from '@/lib/data/api';
import type { OutbreakRecord, SiteRecord, TeamRecord } from '@/lib/types/records';

interface Detail { outbreak: OutbreakRecord; teams: TeamRecord[]; sites: SiteRecord[] }
export interface ManageOutbreaksProps { initial: Detail[] }

const num = (v: FormDataEntryValue | null) => (v === null || v === '' ? undefined : Number(v));

/** Validates with the route's own schema, then posts; field errors from either side show inline. */
function useSubmit<S extends z.ZodType>(schema: S) {
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  async function submit<T>(raw: unknown, url: string, strip: string[] = []): Promise<T | null> {
    const parsed = schema.safeParse(raw);
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message])));
      return null;
    }
    const body = { ...(parsed.data as Record<string, unknown>) };
    for (const k of strip) delete body[k];
    try {
      const res = await apiFetch<T>(url, { method: 'POST', json: body });
      setFields({});
      setError(null);
      return res;
    } catch (err) {
      if (err instanceof ApiError && err.fields) setFields(err.fields);
      setError(err instanceof Error ? err.message : 'Not saved.');
      return null;
    }
  }
  return { fields, error, submit };
}

function OutbreakBlock({ detail, onChange }: { detail: Detail; onChange: (d: Detail) => void }) {
  const { outbreak, teams, sites } = detail;
  const team = useSubmit(teamInputSchema);
  const site = useSubmit(siteInputSchema);
  return (
    <Card title={outbreak.name}>
      <p className="mb-3 text-ink/80">{outbreak.disease} · {outbreak.area} · day 0 {outbreak.startDate} · <span className="num">{outbreak.population.toLocaleString()}</span> people · beds {outbreak.beds ?? '—'}</p>
      <div className="grid gap-4 md:grid-cols-2">
        <div>
          <h3 className="font-bold">Teams</h3>
          <ul className="mb-2 list-disc pl-5">{teams.map((t) => <li key={t.id}>{t.name}</li>)}</ul>
          <form className="flex flex-col gap-2" noValidate onSubmit={async (e: FormEvent<HTMLFormElement>) => {
            e.preventDefault();
            const form = e.currentTarget;
            const d = new FormData(form);
            const res = await team.submit<{ team: TeamRecord }>({ outbreakId: outbreak.id, name: d.get('name') }, `/api/outbreaks/${outbreak.id}/teams`, ['outbreakId']);
            if (res) { onChange({ ...detail, teams: [...teams, res.team] }); form.reset(); }
          }}>
            {team.error && <Notice tone="error">{team.error}</Notice>}
            <TextField label="New team name" name="name" error={team.fields.name} />
            <Button type="submit" variant="secondary">Add team</Button>
          </form>
        </div>
        <div>
          <h3 className="font-bold">Sites</h3>
          <ul className="mb-2 list-disc pl-5">
            {sites.map((s) => <li key={s.id}>{s.name} <span className="text-ink/70">({s.kind}, <span className="num">{s.population.toLocaleString()}</span>; {teams.find((t) => t.id === s.teamId)?.name ?? 'no team'})</span></li>)}
          </ul>
          <form className="flex flex-col gap-2" noValidate onSubmit={async (e: FormEvent<HTMLFormElement>) => {
            e.preventDefault();
            const form = e.currentTarget;
            const d = new FormData(form);
            const res = await site.submit<{ site: SiteRecord }>(
              { outbreakId: outbreak.id, name: d.get('name'), kind: d.get('kind'), population: num(d.get('population')), teamId: (d.get('teamId') as string) || null },
              `/api/outbreaks/${outbreak.id}/sites`, ['outbreakId'],
            );
            if (res) { onChange({ ...detail, sites: [...sites, res.site] }); form.reset(); }
          }}>
            {site.error && <Notice tone="error">{site.error}</Notice>}
            <TextField label="New site name" name="name" error={site.fields.name} />
            <SelectField label="Kind" name="kind" options={SITE_KINDS.map((k) => ({ value: k, label: k }))} error={site.fields.kind} />
            <TextField label="Population (people)" name="population" type="number" inputMode="numeric" min={1} error={site.fields.population} />
            <SelectField label="Team" name="teamId" options={[{ value: '', label: 'No team yet' }, ...teams.map((t) => ({ value: t.id, label: t.name }))]} error={site.fields.teamId} />
            <Button type="submit" variant="secondary">Add site</Button>
          </form>
        </div>
      </div>
    </Card>
  );
}

/** A coordinator's page to create outbreaks, teams and sites. */
export function ManageOutbreaks({ initial }: ManageOutbreaksProps) {
  const [details, setDetails] = useState(initial);
  const ob = useSubmit(outbreakInputSchema);
  return (
    <div className="flex flex-col gap-4">
      <h1>Outbreaks, teams and sites</h1>
      {details.map((d) => (
        <OutbreakBlock key={d.outbreak.id} detail={d} onChange={(nd) => setDetails((list) => list.map((x) => (x.outbreak.id === nd.outbreak.id ? nd : x)))} />
      ))}
      <Card title="New outbreak">
        <form className="grid gap-3 sm:grid-cols-2" noValidate onSubmit={async (e: FormEvent<HTMLFormElement>) => {
          e.preventDefault();
          const form = e.currentTarget;
          const d = new FormData(form);
          const res = await ob.submit<{ outbreak: OutbreakRecord }>({
            name: d.get('name'), disease: d.get('disease'), area: d.get('area'), population: num(d.get('population')),
            startDate: d.get('startDate'), beds: num(d.get('beds')) ?? null,
          }, '/api/outbreaks');
          if (res) { setDetails((list) => [{ outbreak: res.outbreak, teams: [], sites: [] }, ...list]); form.reset(); }
        }}>
          {ob.error && <div className="sm:col-span-2"><Notice tone="error">{ob.error}</Notice></div>}
          <TextField label="Name" name="name" error={ob.fields.name} />
          <TextField label="Disease" name="disease" placeholder="e.g. Measles" error={ob.fields.disease} />
          <TextField label="Area" name="area" error={ob.fields.area} />
          <TextField label="Population (people)" name="population" type="number" inputMode="numeric" min={1} error={ob.fields.population} />
          <TextField label="Day 0" name="startDate" type="date" error={ob.fields.startDate} />
          <TextField label="Beds available" name="beds" type="number" inputMode="numeric" min={0} error={ob.fields.beds} />
          <div className="sm:col-span-2"><Button type="submit">Create outbreak</Button></div>
        </form>
      </Card>
    </div>
  );
}
