/**
 * POST /api/runs — the engine on the server, for scripts and reports (run:compute, signed in).
 *
 *   { "input": ScenarioInput, "series"?: true, "ensemble"?: { "ranges": { "params.beta": [0.4, 0.6] }, "runs": 1000, "seed": 7 } }
 *   → 200 { figures, warnings, series?, ensemble? }
 *
 * Bad fields answer 400 `validation_failed` with `fields` keyed `input.<path>` (an unsafe step also
 * carries `largestSafeStep`, days); a horizon, step count, run count or total work beyond the limits
 * answers 422 `unprocessable` with the reason; a body over 256 KiB answers 413. Infinity is sent as
 * null (JSON has no infinity): e.g. a doubling time or a bed-exceedance day that never comes.
 */
import { authorize } from '@/lib/auth/permissions';
import { AppError, validationError } from '@/lib/http/errors';
import { route } from '@/lib/http/handler';
import {
  MAX_DAYS, MAX_STEPS, ModelError, ensemble, scenarioInputSchema, simulate, summarize,
  type EnsembleResult, type Percentiles, type ScenarioInput,
} from '@/lib/model';
import { SERVER_MAX_RUNS, SERVER_MAX_WORK, runRequestSchema, type RunRequest } from '@/lib/validation/run-request';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

const MAX_BODY = 256 * 1024;

/** Finite numbers as they are; ±Infinity and NaN as null. */
const num = (x: number | null | undefined): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);
const arr = (a: Float64Array | undefined) => (a ? Array.from(a, (v) => num(v)) : undefined);
const pct = (p: Percentiles<number>) => ({ p5: num(p.p5), p25: num(p.p25), p50: num(p.p50), p75: num(p.p75), p95: num(p.p95) });
const pctSeries = (p: Percentiles<Float64Array>) => ({ p5: arr(p.p5), p25: arr(p.p25), p50: arr(p.p50), p75: arr(p.p75), p95: arr(p.p95) });

const unprocessable = (message: string, field: string) => new AppError('unprocessable', message, { fields: { [field]: message } });

/** Compute limits, checked on the raw input before the schema so that they answer 422, not 400. */
function checkLimits(raw: Record<string, unknown>, ens: RunRequest['ensemble']): void {
  const { days, step, method } = raw;
  if (typeof days === 'number' && days > MAX_DAYS) {
    throw unprocessable(`A horizon of ${days} days is beyond the limit of ${MAX_DAYS} days.`, 'input.days');
  }
  const fixed = method !== 'dopri5';
  const steps = typeof days === 'number' && typeof step === 'number' && step > 0 ? (fixed ? days / step : days * 10) : 0;
  if (fixed && steps > MAX_STEPS) {
    throw unprocessable(`A step of ${step} day over ${days} days takes ${Math.ceil(steps)} steps; the limit is ${MAX_STEPS}.`, 'input.step');
  }
  if (ens) {
    if (ens.runs > SERVER_MAX_RUNS) {
      throw unprocessable(`${ens.runs} runs is beyond the server's limit of ${SERVER_MAX_RUNS} per request; run large ensembles on the device.`, 'ensemble.runs');
    }
    if (ens.runs * steps > SERVER_MAX_WORK) {
      throw unprocessable(
        `${ens.runs} runs × ${Math.ceil(steps)} steps is beyond the server's limit of ${SERVER_MAX_WORK} steps per request; use fewer runs, a shorter horizon or a larger step.`,
        'ensemble.runs',
      );
    }
  }
}

/** A ModelError with its field under the request's own path (`input.` or `ensemble.`). */
function fromModelError(e: ModelError, prefix: 'input' | 'ensemble'): AppError {
  const fields: Record<string, string> = {};
  for (const [k, v] of Object.entries(e.fields ?? (e.field ? { [e.field]: e.message } : {}))) fields[`${prefix}.${k}`] = v;
  const detail = e.largestSafeStep !== undefined ? { largestSafeStep: e.largestSafeStep } : undefined;
  const code = e.code === 'step_failure' ? 'unprocessable' : 'validation_failed';
  return new AppError(code, e.message, { fields, ...(detail ? { detail } : {}) });
}

function ensembleJson(r: EnsembleResult, series: boolean) {
  return {
    runs: r.runs,
    peakDay: pct(r.peakDay),
    peakInfectious: pct(r.peakInfectious),
    bedsExceededDay: r.bedsExceededDay ? { ...pct(r.bedsExceededDay), share: r.bedsExceededDay.share } : null,
    ...(series
      ? {
          t: arr(r.t),
          bands: {
            I: pctSeries(r.bands.I),
            incidence: pctSeries(r.bands.incidence),
            ...(r.bands.bedDemand ? { bedDemand: pctSeries(r.bands.bedDemand) } : {}),
          },
        }
      : {}),
  };
}

export const POST = route({ body: runRequestSchema, maxBytes: MAX_BODY }, async ({ actor, body }) => {
  authorize(actor, 'run:compute');
  checkLimits(body.input, body.ensemble);
  const parsed = scenarioInputSchema.safeParse(body.input);
  if (!parsed.success) {
    throw validationError(parsed.error.issues.map((i) => ({ path: ['input', ...i.path], message: i.message })));
  }
  const input: ScenarioInput = parsed.data;

  let figures, warnings, series;
  try {
    const run = simulate(input);
    const s = summarize(run, input);
    let bedPeak: number | null = null;
    if (s.bedDemand) for (const b of s.bedDemand) bedPeak = bedPeak === null || b > bedPeak ? b : bedPeak;
    figures = {
      R0: num(s.R0),
      peakDay: num(s.peakDay),
      peakInfectious: num(s.peakInfectious),
      finalSize: num(s.finalSize),
      attackRate: num(s.attackRate),
      herdImmunityThreshold: num(s.herdImmunityThreshold),
      growthRate: num(s.growthRate),
      doublingTime: num(s.doublingTime),
      bedsExceededDay: s.bedsExceededDay === undefined ? undefined : num(s.bedsExceededDay),
      bedPeak,
    };
    warnings = run.warnings;
    if (body.series) {
      series = {
        t: arr(run.t), S: arr(run.S), E: arr(run.E), I: arr(run.I), R: arr(run.R), V: arr(run.V),
        incidence: arr(run.incidence), Rt: arr(s.Rt), bedDemand: arr(s.bedDemand),
      };
    }
  } catch (e) {
    if (e instanceof ModelError) throw fromModelError(e, 'input');
    throw e;
  }

  let ens;
  if (body.ensemble) {
    try {
      ens = ensembleJson(ensemble(input, body.ensemble.ranges, body.ensemble.runs, body.ensemble.seed ?? 1), Boolean(body.series));
    } catch (e) {
      if (e instanceof ModelError) throw fromModelError(e, e.field?.startsWith('ranges') || e.field === 'runs' ? 'ensemble' : 'input');
      throw e;
    }
  }
  return { figures, warnings, ...(series ? { series } : {}), ...(ens ? { ensemble: ens } : {}) };
});
