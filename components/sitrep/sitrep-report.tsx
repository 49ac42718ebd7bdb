import { Cautions } from '@/components/cautions';
import { formatDay, formatWhen } from '@/lib/mail/format';
import { keyFigures, num } from './figures';
import { SvgChart } from './svg-chart';
import type { SitrepData } from './types';

const C = { ink: '#1D2433', accent: '#1F6F78', infectious: '#C4473A', removed: '#4A5A9C', exposed: '#C8962E', warning: '#B5531C', vaccinated: '#7A5C99', susceptible: '#6E8B3D' };
const SCENARIO_STYLE = [
  { color: C.infectious, dash: 'solid' }, { color: C.removed, dash: 'dashed' }, { color: C.susceptible, dash: 'dotted' },
  { color: C.vaccinated, dash: 'dashed' }, { color: C.exposed, dash: 'dotted' }, { color: C.accent, dash: 'solid' },
] as const;

function Section({ title, children, id }: { title: string; children: React.ReactNode; id: string }) {
  return (
    <section className="sitrep-section break-inside-avoid border-t border-line pt-3" aria-labelledby={id}>
      <h2 id={id} className="mb-2">{title}</h2>
      {children}
    </section>
  );
}

/** The printable situation report (A4). Server-rendered; charts are SVG. */
export function SitrepReport({ data }: { data: SitrepData }) {
  const o = data.outbreak;
  const figures = keyFigures(data);
  const f = data.forecast;
  const curveDates = data.curve.map((d) => d.date);
  const cutoffMark = data.cutoff ? [{ date: data.cutoff, label: 'cut-off' }] : [];
  const observedOnForecast = f ? f.dates.map((d) => (data.cutoff && d <= data.cutoff ? data.curve.find((c) => c.date === d)?.cases ?? null : null)) : [];
  const inp = f?.input;

  return (
    <article className="sitrep flex flex-col gap-4" data-testid="sitrep">
      {/* A4 print: the app shell is hidden (no-print), the report fills the page in a smaller type. */}
      <style>{`@media print {
        .sitrep { font-size: 9.5pt; line-height: 1.35; }
        .sitrep h1 { font-size: 16pt; } .sitrep h2 { font-size: 12pt; }
        .sitrep-section, .sitrep-chart, .sitrep table tr { break-inside: avoid; }
        .sitrep .bg-panel { background: #fff !important; }
        main { max-width: none !important; padding: 0 !important; }
      }`}</style>
      <header className="flex flex-col gap-1">
        <p className="text-sm font-bold uppercase tracking-wide text-accent">Situation report</p>
        <h1>{o.name}</h1>
        <p>{o.disease} · {o.area} · {num(o.population)} people · day 0 {formatDay(o.startDate)}{o.beds !== null ? ` · ${num(o.beds)} beds` : ''}</p>
        <p className="text-sm text-ink/70">Prepared {formatWhen(new Date(data.generatedAt))}. Figures use the days up to the data cut-off.</p>
      </header>

      <section aria-label="Key figures" className="grid grid-cols-2 gap-2 print:grid-cols-2 md:grid-cols-4">
        {figures.map((k) => (
          <div key={k.key} className="break-inside-avoid rounded-lg border border-line bg-panel p-2" data-testid={`fig-${k.key}`}>
            <p className="text-xs font-bold text-ink/70">{k.label}</p>
            <p className="num text-lg font-bold" data-testid={`fig-${k.key}-value`}>{k.value}</p>
            <p className="text-xs">{k.reading}</p>
          </div>
        ))}
      </section>

      <Section title="Epidemic curve" id="s-curve">
        <SvgChart title="Daily new cases, 7-day average and cumulative cases" testId="chart-curve" dates={curveDates} yLabel="cases per day" rightLabel="cumulative"
          series={[
            { label: 'New cases per day', kind: 'bars', color: C.infectious, values: data.curve.map((d) => (d.reported ? d.cases : null)) },
            { label: '7-day average', kind: 'line', color: C.ink, values: data.curve.map((d) => d.avg7) },
            { label: 'Cumulative (right axis)', kind: 'line', color: C.removed, dash: 'dashed', right: true, values: data.curve.map((d) => d.cumulative) },
          ]}
          marks={cutoffMark} />
        <p className="text-xs text-ink/70">Days after the cut-off are still coming in; days with no report at all are left blank, not drawn as zero.</p>
      </Section>

      <Section title="Cases per site" id="s-sites">
        <table className="w-full text-left text-sm" data-testid="sitrep-sites">
          <thead className="border-b border-line"><tr><th className="p-1">Site</th><th className="p-1">Kind</th><th className="p-1 text-right">People</th><th className="p-1 text-right">Cases to date</th><th className="p-1 text-right">Last 7 days</th><th className="p-1 text-right">Per 1,000</th><th className="p-1">Last report</th></tr></thead>
          <tbody>
            {data.sites.map((s) => (
              <tr key={s.id} className="border-b border-line/60">
                <td className="p-1 font-bold">{s.name}</td><td className="p-1">{s.kind}</td><td className="p-1 text-right">{num(s.population)}</td>
                <td className="p-1 text-right">{num(s.cases)}</td><td className="p-1 text-right">{num(s.casesLast7)}</td><td className="p-1 text-right">{num(s.per1000, 1)}</td>
                <td className="p-1">{s.lastReport ? formatDay(s.lastReport) : '—'}</td>
              </tr>
            ))}
            <tr className="font-bold"><td className="p-1">All sites</td><td /><td className="p-1 text-right">{num(data.sites.reduce((a, s) => a + s.population, 0))}</td>
              <td className="p-1 text-right">{num(data.sites.reduce((a, s) => a + s.cases, 0))}</td><td className="p-1 text-right">{num(data.sites.reduce((a, s) => a + s.casesLast7, 0))}</td><td /><td /></tr>
          </tbody>
        </table>
      </Section>

      <Section title="Growth and reproduction number" id="s-growth">
        {data.growth ? (
          <p>Growth rate {num(data.growth.r, 3)} per day (95% interval {num(data.growth.interval[0], 3)} to {num(data.growth.interval[1], 3)}), from a Poisson log-linear fit to the daily cases of {formatDay(data.growth.fromDate)} to {formatDay(data.growth.toDate)}
            {data.growth.dispersion > 1 ? `; the counts vary more than a Poisson model expects (dispersion ${num(data.growth.dispersion, 1)}), so the interval is widened accordingly (quasi-Poisson).` : '.'}</p>
        ) : <p>No growth rate for this report.</p>}
        {data.rt && (
          <SvgChart title="Effective reproduction number Rt over time" testId="chart-rt" dates={data.rt.series.map((r) => r.date)} yLabel="Rt" height={200}
            series={[
              { label: '95% credible interval', kind: 'band', color: C.accent, values: data.rt.series.map((r) => r.lo), upper: data.rt.series.map((r) => r.hi) },
              { label: 'Rt (posterior mean)', kind: 'line', color: C.accent, values: data.rt.series.map((r) => r.mean) },
            ]}
            refs={[{ value: 1, label: 'Rt = 1', color: C.warning }]} />
        )}
      </Section>

      <Section title={f?.source === 'official' ? `Official forecast: ${f.name}` : 'Forecast (computed for this report)'} id="s-forecast">
        {f ? (
          <>
            <p className="text-sm" data-testid="forecast-method">{f.method}</p>
            {f.source === 'official' && <p className="text-sm">Version {f.scenarioVersion}, published {f.publishedAt ? formatWhen(new Date(f.publishedAt)) : ''}{f.publishedBy ? ` by ${f.publishedBy}` : ''}.</p>}
            <SvgChart title="Forecast of new cases per day with its band" testId="chart-forecast" dates={f.dates} yLabel="new cases per day" height={220}
              series={[
                ...(f.banded ? [{ label: '5th–95th percentile', kind: 'band' as const, color: C.infectious, values: f.incidence.p5, upper: f.incidence.p95 }] : []),
                { label: 'Forecast (central)', kind: 'line', color: C.infectious, values: f.incidence.p50 },
                { label: 'Observed to the cut-off', kind: 'line', color: C.ink, dash: 'dotted', values: observedOnForecast },
              ]}
              marks={cutoffMark} />
            {f.bedDemand ? (
              <SvgChart title="Bed demand against the beds available" testId="chart-beds" dates={f.dates} yLabel="occupied beds" height={200}
                series={[
                  ...(f.banded ? [{ label: '5th–95th percentile', kind: 'band' as const, color: C.removed, values: f.bedDemand.p5, upper: f.bedDemand.p95 }] : []),
                  { label: 'Bed demand (central)', kind: 'line', color: C.removed, values: f.bedDemand.p50 },
                ]}
                refs={f.beds !== null ? [{ value: f.beds, label: `${num(f.beds)} beds`, color: C.warning }] : []} />
            ) : <p>The forecast has no bed settings (admission fraction and length of stay), so bed demand is not shown.</p>}
          </>
        ) : <p>No forecast for this report.</p>}
      </Section>

      <Section title="Scenarios compared" id="s-scenarios">
        {data.scenarios.length === 0 ? <p>No saved scenarios.</p> : (
          <>
            <table className="w-full text-left text-sm" data-testid="sitrep-scenarios">
              <thead className="border-b border-line"><tr><th className="p-1">Scenario</th><th className="p-1">Model, method</th><th className="p-1 text-right">R0</th><th className="p-1">Peak</th><th className="p-1 text-right">At peak</th><th className="p-1 text-right">Attack rate</th><th className="p-1 text-right">Bed peak</th><th className="p-1">Beds exceeded</th><th className="p-1">Interventions</th></tr></thead>
              <tbody>
                {data.scenarios.map((s) => (
                  <tr key={s.id} className="border-b border-line/60">
                    <td className="p-1 font-bold">{s.name}{s.official ? ' (official)' : ''}</td>
                    <td className="p-1">{s.model}, {s.method}, step {s.step} d</td>
                    {s.error ? <td colSpan={7} className="p-1 text-warning">{s.error}</td> : (
                      <>
                        <td className="p-1 text-right">{num(s.R0, 2)}</td><td className="p-1">{formatDay(s.peakDate)}</td><td className="p-1 text-right">{num(s.peakInfectious)}</td>
                        <td className="p-1 text-right">{num(s.attackRate * 100, 1)}%</td><td className="p-1 text-right">{s.bedPeak === null ? '—' : num(s.bedPeak)}</td>
                        <td className="p-1">{s.bedsExceededDate ? formatDay(s.bedsExceededDate) : s.bedPeak === null ? '—' : 'no'}</td><td className="p-1">{s.interventions}</td>
                      </>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
            {(() => {
              const ok = data.scenarios.filter((s) => !s.error && s.incidence.length);
              const len = Math.max(0, ...ok.map((s) => s.incidence.length));
              if (!ok.length) return null;
              const dates = Array.from({ length: len }, (_, i) => {
                const d = new Date(`${o.startDate}T00:00:00Z`);
                d.setUTCDate(d.getUTCDate() + i);
                return d.toISOString().slice(0, 10);
              });
              return (
                <SvgChart title="New infections per day in each scenario" testId="chart-scenarios" dates={dates} yLabel="new infections per day" height={200}
                  series={ok.map((s, i) => ({ label: s.name, kind: 'line' as const, color: SCENARIO_STYLE[i % SCENARIO_STYLE.length]!.color, dash: SCENARIO_STYLE[i % SCENARIO_STYLE.length]!.dash, values: s.incidence }))} />
              );
            })()}
          </>
        )}
      </Section>

      <Section title="Assumptions" id="s-assumptions">
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm" data-testid="sitrep-assumptions">
          {inp && (
            <>
              <dt className="font-bold">Model</dt><dd>{inp.model}, closed well-mixed population of {num(inp.population)} people</dd>
              <dt className="font-bold">Parameters</dt>
              <dd>β {num(inp.params.beta, 3)} per day, γ {num(inp.params.gamma, 3)} per day (infectious period {num(1 / inp.params.gamma, 1)} days)
                {inp.params.sigma !== undefined ? `, σ ${num(inp.params.sigma, 3)} per day` : ''}{inp.params.omega !== undefined ? `, ω ${num(inp.params.omega, 4)} per day` : ''};
                R0 {num(f!.R0, 2)}{f!.R0Range ? ` (${num(f!.R0Range[0], 2)} to ${num(f!.R0Range[1], 2)})` : ''}; initially {num(inp.initial.I, 1)} infectious</dd>
              <dt className="font-bold">Method and step</dt><dd>{inp.method === 'rk4' ? 'Classical Runge–Kutta (RK4)' : inp.method === 'euler' ? 'Forward Euler' : 'Dormand–Prince (adaptive)'}, step {inp.step} day, horizon {inp.days} days</dd>
              <dt className="font-bold">Beds</dt><dd>{inp.capacity ? `${num(inp.capacity.admissionFraction * 100, 1)}% of new infections admitted, mean stay ${num(inp.capacity.lengthOfStay, 1)} days, ${num(f!.beds ?? inp.capacity.beds)} beds` : 'not modelled'}</dd>
              <dt className="font-bold">Interventions</dt><dd>{inp.interventions?.length ? inp.interventions.map((iv) => `contacts −${Math.round(iv.contactReduction * 100)}% from day ${iv.startDay}${iv.endDay !== undefined ? ` to day ${iv.endDay}` : ''}`).join('; ') : 'none'}</dd>
            </>
          )}
          <dt className="font-bold">Rt</dt><dd>Renewal equation with a gamma prior (Cori et al. 2013), serial interval mean {data.rt?.siMean ?? 2.6} days, sd {data.rt?.siSd ?? 1.5} days, {data.rt?.window ?? 7}-day window</dd>
          <dt className="font-bold">Growth</dt><dd>Poisson log-linear regression over the last 14 complete days; doubling time ln 2 / r</dd>
          <dt className="font-bold">Cut-off</dt><dd>The last day before today on which more than half the sites reported</dd>
        </dl>
        {data.notes.length > 0 && (
          <ul className="mt-2 list-disc pl-5 text-sm" data-testid="sitrep-notes">{data.notes.map((n) => <li key={n}>{n}</li>)}</ul>
        )}
      </Section>

      <section className="break-inside-avoid" aria-label="Cautions"><Cautions /></section>
    </article>
  );
}
