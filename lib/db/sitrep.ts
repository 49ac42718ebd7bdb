/**
 * The situation report of an outbreak (issue 7), computed on the server from the tallies, the
 * official forecast and the saved scenarios with the pure engine (lib/model). The page, the e-mail
 * summary and the capacity alert all read this one shape, so their figures agree.
 */
import { Op, fn, col } from 'sequelize';
import { Outbreak, Scenario, Site, Tally, User } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { notFound } from '@/lib/http/errors';
import {
  ensembleFromSamples, estimateRt, fitScenario, forecastFromFit, growthRateFromCounts, latinHypercube, mulberry32,
  scenarioInputSchema, simulate, summarize, type EnsembleResult, type ScenarioInput,
} from '@/lib/model';
import { scenarioNotesSchema } from '@/lib/validation/scenario-record';
import { addDays, daysBetween } from '@/lib/tallies/dates';
import type { Band, SitrepData, SitrepForecast, SitrepScenario, SitrepSite } from '@/components/sitrep/types';
import { db } from './connection';
import { currentChangeSeq } from './counters';
import { getEpiCurve } from './curve';
import { recordLedger } from './ledger';
import { listOutbreakMembers } from './users';
import { AppError } from '@/lib/http/errors';
import { keyFigures } from '@/components/sitrep/figures';
import { sitrepMail } from '@/lib/mail/messages';
import { appUrl } from '@/lib/mail/links';
import { sendMail } from '@/lib/mail/transport';

/** Serial interval of an influenza-like illness used for Rt, days (mean, sd) [cp]; the forecast screen's defaults. */
export const SITREP_SERIAL_INTERVAL = { mean: 2.6, sd: 1.5 } as const;
/** Rt window, days (Cori et al. 2013 default) [pub]. */
export const SITREP_RT_WINDOW = 7;
/** Growth is read over the last 14 complete days. */
export const SITREP_GROWTH_DAYS = 14;
/** Runs behind the bands. */
export const SITREP_RUNS = 200;
/** Without bed settings in a computed forecast: admissions per case and stay, assumptions of this report [cp]. */
export const DEFAULT_ADMISSION_FRACTION = 0.05;
export const DEFAULT_LENGTH_OF_STAY = 5;
/** Scenarios with more fixed steps than this are not re-run for the report (they would hold the page). */
const MAX_REPORT_STEPS = 400_000;

const round = (x: number, d = 3) => Math.round(x * 10 ** d) / 10 ** d;
const seedOf = (s: string) => {
  let h = 2166136261;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 16777619);
  return h >>> 0;
};

function band(p: { p5: Float64Array; p50: Float64Array; p95: Float64Array } | undefined): Band | null {
  if (!p) return null;
  return { p5: Array.from(p.p5, (v) => round(v)), p50: Array.from(p.p50, (v) => round(v)), p95: Array.from(p.p95, (v) => round(v)) };
}

/** First index ≥ from where series > limit, or null. */
function firstAbove(series: ArrayLike<number>, limit: number, from = 0): number | null {
  for (let i = Math.max(0, from); i < series.length; i++) if (series[i]! > limit) return i;
  return null;
}

function describeInterventions(input: ScenarioInput): string {
  const list = input.interventions ?? [];
  const parts = list.map((iv) => `−${Math.round(iv.contactReduction * 100)}% contacts from day ${iv.startDay}${iv.endDay !== undefined ? ` to ${iv.endDay}` : ''}`);
  if (input.vaccination?.atStart) parts.push(`${Math.round(input.vaccination.atStart * 100)}% vaccinated at start`);
  if (input.vaccination?.dailyRate) parts.push(`${round(input.vaccination.dailyRate * 100, 2)}% of susceptibles vaccinated per day`);
  return parts.join('; ') || 'none';
}

/** Forecast view from an ensemble (bands) and the scenario it belongs to. */
function fromEnsemble(
  base: Omit<SitrepForecast, 'dates' | 'incidence' | 'bedDemand' | 'banded' | 'runs' | 'peak' | 'bedsExceeded'>,
  startDate: string,
  ens: EnsembleResult,
  banded: boolean,
): SitrepForecast {
  const dates = Array.from(ens.t, (t) => addDays(startDate, Math.round(t)));
  const day = (d: number) => addDays(startDate, Math.round(d));
  const bedDemand = band(ens.bands.bedDemand);
  const beds = base.beds;
  let bedsExceeded: SitrepForecast['bedsExceeded'] = null;
  if (bedDemand && beds !== null) {
    const c = firstAbove(bedDemand.p50, beds);
    const e = firstAbove(bedDemand.p95, beds);
    const l = firstAbove(bedDemand.p5, beds);
    bedsExceeded = {
      date: c === null ? null : dates[c]!, earliest: e === null ? null : dates[e]!, latest: l === null ? null : dates[l]!,
      share: ens.bedsExceededDay ? round(ens.bedsExceededDay.share, 3) : null,
    };
  }
  return {
    ...base, dates, incidence: band(ens.bands.incidence)!, bedDemand, banded, runs: ens.runs,
    peak: {
      date: day(ens.peakDay.p50), range: [day(ens.peakDay.p5), day(ens.peakDay.p95)],
      infectious: round(ens.peakInfectious.p50, 1), infectiousRange: [round(ens.peakInfectious.p5, 1), round(ens.peakInfectious.p95, 1)],
    },
    bedsExceeded,
  };
}

/**
 * The outbreak's official forecast as the report draws it: the published scenario itself is the
 * central run; when it came from a Fit with intervals, the bands are 200 runs with R0 and the
 * infectious period drawn across those published intervals (Latin hypercube), so no new fit is made.
 */
export async function officialForecast(outbreakId: string): Promise<SitrepForecast | null> {
  await db();
  const outbreak = await Outbreak.findByPk(outbreakId);
  if (!outbreak) return null;
  const row = await Scenario.findOne({ where: { outbreakId, official: true, deletedAt: null } });
  if (!row) return null;
  const parsed = scenarioInputSchema.safeParse(JSON.parse(row.input));
  if (!parsed.success) return null;
  const input: ScenarioInput = { ...parsed.data, record: 'daily' };
  const notes = scenarioNotesSchema.safeParse(row.notes ? JSON.parse(row.notes) : null);
  const fit = notes.success ? notes.data.fit : undefined;
  const publisher = row.updatedBy ? await User.findByPk(row.updatedBy, { attributes: ['name'] }) : null;
  const beds = input.capacity?.beds ?? outbreak.beds ?? null;
  const R0 = input.params.beta / input.params.gamma;
  const base = {
    source: 'official' as const, scenarioId: row.id, scenarioVersion: Number(row.version), name: row.name,
    publishedAt: new Date(row.updatedAt).toISOString(), publishedBy: publisher?.name ?? null, input, beds,
    R0: round(R0, 2), R0Range: fit?.R0Range ? ([round(fit.R0Range[0], 2), round(fit.R0Range[1], 2)] as [number, number]) : null,
  };
  const withBeds: ScenarioInput = input.capacity && beds !== null ? { ...input, capacity: { ...input.capacity, beds } } : input;
  if (fit?.R0Range && fit.infectiousPeriodRange) {
    const rng = mulberry32(seedOf(`${row.id}:${row.version}`));
    const u = latinHypercube(SITREP_RUNS, 2, rng);
    const [r0lo, r0hi] = fit.R0Range;
    const [iplo, iphi] = fit.infectiousPeriodRange;
    const samples = Array.from({ length: SITREP_RUNS }, (_, i) => {
      const R = r0lo + (r0hi - r0lo) * u[i * 2]!;
      const ip = iplo + (iphi - iplo) * u[i * 2 + 1]!;
      return { 'params.beta': R / ip, 'params.gamma': 1 / ip };
    });
    const ens = ensembleFromSamples(withBeds, samples);
    // The published scenario stays the central line; the draws give the spread around it.
    const central = ensembleFromSamples(withBeds, [{ 'params.beta': input.params.beta }]);
    const view = fromEnsemble(
      { ...base, method: `The published scenario (${input.model}, ${input.method}, step ${input.step} day) is the central line; the band is the 5th–95th percentile of ${SITREP_RUNS} runs with R0 and the infectious period drawn across their published 95% intervals (Latin hypercube).` },
      String(outbreak.startDate), ens, true,
    );
    const c = fromEnsemble({ ...base, method: view.method }, String(outbreak.startDate), central, false);
    return {
      ...view,
      incidence: { ...view.incidence, p50: c.incidence.p50 },
      bedDemand: view.bedDemand && c.bedDemand ? { ...view.bedDemand, p50: c.bedDemand.p50 } : view.bedDemand,
      peak: { ...view.peak, date: c.peak.date, infectious: c.peak.infectious },
      bedsExceeded: view.bedsExceeded && c.bedsExceeded ? { ...view.bedsExceeded, date: c.bedsExceeded.date } : view.bedsExceeded,
    };
  }
  const single = ensembleFromSamples(withBeds, [{ 'params.beta': input.params.beta }]);
  return fromEnsemble(
    { ...base, method: `The published scenario (${input.model}, ${input.method}, step ${input.step} day), one run: it was set by hand, so it carries no uncertainty band.` },
    String(outbreak.startDate), single, false,
  );
}

/** With no official forecast: an SIR fit of the tallies to the cut-off and 200 runs over the fit's draws. */
function computedForecast(
  outbreak: Outbreak,
  incidence: number[],
  reported: boolean[],
  admissionFraction: number,
): SitrepForecast | null {
  const dataUntil = incidence.length - 1;
  const days: number[] = [];
  const values: number[] = [];
  // Days 1..cut-off on which some site reported (as the forecast screen fits): a 0 on a silent day is no report.
  for (let d = 1; d <= dataUntil; d++) {
    if (!reported[d]) continue;
    days.push(d);
    values.push(incidence[d]!);
  }
  if (values.filter((v) => v > 0).length < 5) return null;
  const seed = seedOf(`${outbreak.id}:${dataUntil}:${values.reduce((a, b) => a + b, 0)}`);
  const fit = fitScenario({
    model: 'SIR', population: outbreak.population, initial: { I: Math.max(1, incidence[0]! || values[0]! || 1) },
    observed: { day: days, value: values }, observe: 'incidence', estimate: ['beta', 'gamma', 'I0'], likelihood: 'poisson',
    method: 'rk4', step: 0.5, options: { samples: 400, seed },
  });
  const beds = outbreak.beds ?? null;
  const horizon = dataUntil + 42;
  const capacity = beds !== null ? { admissionFraction, lengthOfStay: DEFAULT_LENGTH_OF_STAY, beds } : undefined;
  const ens = forecastFromFit(fit, { days: horizon, ...(capacity ? { capacity } : {}) }, SITREP_RUNS, seed);
  const input: ScenarioInput = {
    model: 'SIR', population: outbreak.population, initial: { I: fit.initial.I }, params: { beta: fit.params.beta, gamma: fit.params.gamma },
    method: 'rk4', step: ens.step, days: horizon, record: 'daily', ...(capacity ? { capacity } : {}),
  };
  const r0 = fit.interval.R0;
  return fromEnsemble(
    {
      source: 'computed', scenarioId: null, scenarioVersion: null, name: 'Computed for this report', publishedAt: null, publishedBy: null,
      method: `Computed for this report (no official forecast is published): an SIR model fitted to the daily cases of days 1–${dataUntil} (the days some site reported) by Poisson maximum likelihood (β, γ and the initial infectious), then ${SITREP_RUNS} RK4 runs over the fit's parameter draws; the band is their 5th–95th percentile.`,
      input, beds, R0: round(fit.R0, 2), R0Range: r0 ? [round(r0[0], 2), round(r0[1], 2)] : null,
    },
    String(outbreak.startDate), ens, true,
  );
}

function runScenario(row: Scenario, startDate: string, beds: number | null): SitrepScenario {
  const base = { id: row.id, name: row.name, official: Boolean(row.official) };
  const parsed = scenarioInputSchema.safeParse(JSON.parse(row.input));
  if (!parsed.success) {
    return { ...base, model: '?', method: '?', step: 0, days: 0, R0: NaN, peakDate: '', peakInfectious: NaN, attackRate: NaN, bedPeak: null, bedsExceededDate: null, interventions: '', incidence: [], error: 'The saved input is not valid.' };
  }
  const input = { ...parsed.data, record: 'daily' as const };
  if (input.capacity && beds !== null && input.capacity.beds === undefined) input.capacity = { ...input.capacity, beds };
  const common = { ...base, model: input.model, method: input.method, step: input.step, days: input.days, interventions: describeInterventions(input) };
  if (input.method !== 'dopri5' && input.days / input.step > MAX_REPORT_STEPS) {
    return { ...common, R0: input.params.beta / input.params.gamma, peakDate: '', peakInfectious: NaN, attackRate: NaN, bedPeak: null, bedsExceededDate: null, incidence: [], error: 'Too many steps to re-run for the report.' };
  }
  try {
    const run = simulate(input);
    const s = summarize(run, input);
    return {
      ...common, R0: round(s.R0, 2), peakDate: addDays(startDate, Math.round(s.peakDay)), peakInfectious: round(s.peakInfectious, 1),
      attackRate: round(s.attackRate, 4), bedPeak: s.bedDemand ? round(Math.max(...s.bedDemand), 1) : null,
      bedsExceededDate: s.bedsExceededDay == null ? null : addDays(startDate, Math.ceil(s.bedsExceededDay)),
      incidence: Array.from(run.incidence, (v) => round(v, 2)), error: null,
    };
  } catch (e) {
    return { ...common, R0: NaN, peakDate: '', peakInfectious: NaN, attackRate: NaN, bedPeak: null, bedsExceededDate: null, incidence: [], error: e instanceof Error ? e.message : 'The run failed.' };
  }
}

const sumOf = (a: number[], from: number, to: number) => {
  let s = 0;
  for (let i = Math.max(0, from); i <= to && i < a.length; i++) s += a[i]!;
  return s;
};

/** Everything the sitrep shows, for an actor who may read it. */
export async function getSitrep(actor: Actor, outbreakId: string, opts: { today?: string | null } = {}): Promise<SitrepData> {
  authorize(actor, 'sitrep:read', { outbreakId });
  await db();
  const outbreak = await Outbreak.findByPk(outbreakId);
  if (!outbreak || outbreak.deletedAt) throw notFound('Outbreak');
  const startDate = String(outbreak.startDate);
  const curve = await getEpiCurve(actor, outbreakId, { today: opts.today });
  const notes: string[] = [];
  const cutoff = curve.cutoff;
  const dataUntil = cutoff ? daysBetween(startDate, cutoff) : -1;
  const incidence: number[] = dataUntil >= 0 ? new Array<number>(dataUntil + 1).fill(0) : [];
  const reported: boolean[] = incidence.map(() => false);
  for (const d of curve.days) {
    const k = daysBetween(startDate, d.date);
    if (k >= 0 && k <= dataUntil) {
      incidence[k] = d.cases;
      reported[k] = d.reported;
    }
  }
  const casesToDate = curve.days.reduce((s, d) => s + d.cases, 0);
  const casesLast7 = sumOf(incidence, dataUntil - 6, dataUntil);
  const casesPrev7 = sumOf(incidence, dataUntil - 13, dataUntil - 7);
  const atCutoff = cutoff ? curve.days.find((d) => d.date === cutoff)?.reportingSites ?? 0 : 0;

  // Per site: totals, the last week to the cut-off, the latest report. Field officers see their teams' sites.
  const siteWhere: Record<string | symbol, unknown> = { outbreakId, deletedAt: null };
  if (actor.role === 'field') siteWhere.teamId = { [Op.in]: actor.teamIds };
  const siteRows = await Site.findAll({ where: siteWhere, order: [['name', 'ASC']] });
  const ids = siteRows.map((s) => s.id);
  const weekFrom = cutoff ? addDays(cutoff, -6) : '9999-12-31';
  const agg = (await Tally.findAll({
    where: { outbreakId, deletedAt: null, siteId: { [Op.in]: ids } },
    attributes: ['siteId', [fn('SUM', col('new_cases')), 'cases'], [fn('MAX', col('date')), 'last'], [fn('SUM', col('admissions')), 'admissions']],
    group: ['siteId'], raw: true,
  })) as unknown as Array<{ siteId: string; cases: number | string; last: string; admissions: number | string | null }>;
  const week = (await Tally.findAll({
    where: { outbreakId, deletedAt: null, siteId: { [Op.in]: ids }, date: { [Op.between]: [weekFrom, cutoff ?? '0000-01-01'] } },
    attributes: ['siteId', [fn('SUM', col('new_cases')), 'cases']], group: ['siteId'], raw: true,
  })) as unknown as Array<{ siteId: string; cases: number | string }>;
  const sites: SitrepSite[] = siteRows.map((s) => {
    const a = agg.find((x) => x.siteId === s.id);
    const cases = Number(a?.cases ?? 0);
    return {
      id: s.id, name: s.name, kind: s.kind, population: s.population, cases, casesLast7: Number(week.find((x) => x.siteId === s.id)?.cases ?? 0),
      per1000: round((cases / Math.max(1, s.population)) * 1000, 1), lastReport: a?.last ?? null,
    };
  });
  const admissions = agg.reduce((s, a) => s + Number(a.admissions ?? 0), 0);
  const admittedShare = casesToDate > 0 && admissions > 0 ? admissions / casesToDate : null;

  let growth: SitrepData['growth'] = null;
  if (dataUntil >= 3) {
    const from = Math.max(0, dataUntil - (SITREP_GROWTH_DAYS - 1));
    try {
      const g = growthRateFromCounts(incidence, { from, to: dataUntil });
      const over = g.dispersion > 1;
      const interval = over ? g.quasiInterval : g.interval;
      const dbl = (r: number) => (r > 0 ? Math.LN2 / r : Infinity);
      growth = {
        fromDate: addDays(startDate, from), toDate: cutoff!, r: round(g.r, 4), interval: [round(interval[0], 4), round(interval[1], 4)],
        doublingTime: g.r > 0 ? round(g.doublingTime, 1) : Infinity,
        doublingInterval: interval[0] > 0 ? [round(dbl(interval[1]), 1), round(dbl(interval[0]), 1)] : [interval[1] > 0 ? round(dbl(interval[1]), 1) : Infinity, Infinity],
        dispersion: round(g.dispersion, 2),
      };
    } catch (e) {
      notes.push(`No growth rate: ${e instanceof Error ? e.message.replace(/^growthRate: /, '') : 'not enough data'}.`);
    }
  } else notes.push('No growth rate yet: fewer than four complete days.');

  let rt: SitrepData['rt'] = null;
  if (dataUntil > SITREP_RT_WINDOW) {
    try {
      const rows = estimateRt(incidence, { siMean: SITREP_SERIAL_INTERVAL.mean, siSd: SITREP_SERIAL_INTERVAL.sd, window: SITREP_RT_WINDOW });
      const last = rows.at(-1);
      if (last) {
        rt = {
          date: addDays(startDate, last.day), mean: round(last.mean, 2), lo: round(last.lo, 2), hi: round(last.hi, 2), cases: last.cases,
          series: rows.map((r) => ({ date: addDays(startDate, r.day), mean: round(r.mean, 3), lo: round(r.lo, 3), hi: round(r.hi, 3) })),
          siMean: SITREP_SERIAL_INTERVAL.mean, siSd: SITREP_SERIAL_INTERVAL.sd, window: SITREP_RT_WINDOW,
        };
      }
    } catch (e) {
      notes.push(`No Rt: ${e instanceof Error ? e.message : 'not enough data'}.`);
    }
  } else notes.push(`No Rt yet: the estimate needs more than ${SITREP_RT_WINDOW} complete days.`);

  let forecast: SitrepForecast | null = null;
  try {
    forecast = (await officialForecast(outbreakId)) ?? computedForecast(outbreak, incidence, reported, admittedShare ?? DEFAULT_ADMISSION_FRACTION);
    if (forecast?.source === 'computed' && outbreak.beds !== null) {
      notes.push(admittedShare !== null
        ? `Bed demand of the computed forecast assumes ${round(admittedShare * 100, 1)}% of cases admitted (the admissions reported so far) for ${DEFAULT_LENGTH_OF_STAY} days.`
        : `Bed demand of the computed forecast assumes ${DEFAULT_ADMISSION_FRACTION * 100}% of cases admitted for ${DEFAULT_LENGTH_OF_STAY} days (no admissions reported).`);
    }
    if (!forecast) notes.push('No forecast: no official forecast is published and there are too few days with cases to fit one.');
  } catch (e) {
    notes.push(`No forecast: ${e instanceof Error ? e.message : 'the fit failed'}.`);
  }

  const scenarioRows = await Scenario.findAll({ where: { outbreakId, deletedAt: null }, order: [['official', 'DESC'], ['updatedAt', 'DESC']], limit: 8 });
  const scenarios = scenarioRows.map((r) => runScenario(r, startDate, outbreak.beds ?? null));

  return {
    outbreak: { id: outbreak.id, name: outbreak.name, disease: outbreak.disease, area: outbreak.area, population: outbreak.population, startDate, beds: outbreak.beds ?? null },
    generatedAt: new Date().toISOString(), cutoff, casesToDate, casesLast7, casesPrev7, sitesReportingAtCutoff: atCutoff, sitesInView: curve.sitesInView,
    sites, curve: curve.days.map((d) => ({ date: d.date, cases: d.cases, avg7: d.avg7 === null ? null : round(d.avg7, 2), cumulative: d.cumulative, reported: d.reported })),
    growth, rt, forecast, scenarios, notes,
  };
}

const g = globalThis as unknown as { __ebbcastSitrepCache?: Map<string, { at: number; data: SitrepData }> };
const cache: Map<string, { at: number; data: SitrepData }> = (g.__ebbcastSitrepCache ??= new Map());
const CACHE_MS = 5 * 60 * 1000;

/**
 * getSitrep, reused while nothing has changed: the key holds the server change counter (any
 * write moves it) and the actor's view, so the page and a send right after it agree without a second fit.
 */
export async function getSitrepCached(actor: Actor, outbreakId: string, opts: { today?: string | null } = {}): Promise<SitrepData> {
  authorize(actor, 'sitrep:read', { outbreakId });
  await db();
  const seq = await currentChangeSeq();
  const view = actor.role === 'field' ? actor.teamIds.slice().sort().join(',') : 'all';
  const key = `${outbreakId}|${view}|${seq}|${opts.today ?? ''}|${new Date().toISOString().slice(0, 10)}`;
  const hit = cache.get(key);
  if (hit && Date.now() - hit.at < CACHE_MS) return hit.data;
  const data = await getSitrep(actor, outbreakId, opts);
  if (cache.size > 50) cache.clear();
  cache.set(key, { at: Date.now(), data });
  return data;
}

/** One line on the forecast for the e-mail, beside the key figures. */
export function forecastLine(f: SitrepForecast | null): string | null {
  if (!f) return null;
  return f.source === 'official'
    ? `Forecast: the official forecast "${f.name}" (version ${f.scenarioVersion}).`
    : 'Forecast: no official forecast is published; the figures come from a fit computed for this report.';
}

/**
 * "Send to coordinators": e-mails the key figures and a link to each active coordinator of the
 * outbreak, and writes one ledger row naming who sent what to whom.
 */
export async function sendSitrep(actor: Actor, outbreakId: string): Promise<{ recipients: string[]; cutoff: string | null; messageIds: string[] }> {
  authorize(actor, 'sitrep:send', { outbreakId });
  const data = await getSitrepCached(actor, outbreakId);
  const coordinators = await listOutbreakMembers(outbreakId, 'coordinator');
  if (!coordinators.length) throw new AppError('unprocessable', 'This outbreak has no active coordinator to send the sitrep to.');
  const figures = keyFigures(data);
  const link = appUrl(`/sitrep?outbreak=${encodeURIComponent(outbreakId)}`);
  const sent: { email: string; messageId: string }[] = [];
  const failed: string[] = [];
  for (const c of coordinators) {
    try {
      const info = await sendMail(sitrepMail({
        to: c.email, recipientName: c.name, senderName: actor.name, outbreakName: data.outbreak.name, figures,
        forecastLine: forecastLine(data.forecast), link, cutoff: data.cutoff,
      }));
      sent.push({ email: c.email, messageId: info.messageId });
    } catch {
      failed.push(c.email);
    }
  }
  await recordLedger({
    kind: 'sitrep_sent', userId: actor.id, outbreakId, counts: { recipients: sent.length, failed: failed.length },
    detail: {
      cutoff: data.cutoff, recipients: sent.map((s) => s.email), failed, messageIds: sent.map((s) => s.messageId),
      figures: Object.fromEntries(figures.map((f) => [f.key, f.value])),
      forecast: data.forecast ? { source: data.forecast.source, scenarioId: data.forecast.scenarioId, version: data.forecast.scenarioVersion } : null,
    },
  });
  if (!sent.length) throw new AppError('unavailable', 'The mail server did not take the sitrep. Try again in a moment.');
  return { recipients: sent.map((s) => s.email), cutoff: data.cutoff, messageIds: sent.map((s) => s.messageId) };
}
