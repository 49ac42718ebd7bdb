import { call, prepare, sessionCookie } from '../helpers/server';
import { beforeAll, describe, expect, it } from 'vitest';
import { POST } from '@/app/api/runs/route';

let field: string, supervisor: string;

beforeAll(async () => {
  await prepare();
  field = await sessionCookie('field@marrowbend.example');
  supervisor = await sessionCookie('supervisor@marrowbend.example');
});

/** REFERENCES.md §4 canonical case: N = 1000, S0 = 999, I0 = 1, β = 0.5, γ = 0.25. */
const canonical = (over: Record<string, unknown> = {}) => ({
  model: 'SIR', population: 1000, initial: { I: 1 }, params: { beta: 0.5, gamma: 0.25 },
  method: 'rk4', step: 0.1, days: 400, ...over,
});

const post = (body: unknown, cookie = field) => call(POST, '/api/runs', { method: 'POST', body, cookie });

describe('POST /api/runs', () => {
  it('answers 401 signed out', async () => {
    const r = await call(POST, '/api/runs', { method: 'POST', body: { input: canonical() } });
    expect(r.status).toBe(401);
  });

  it('returns the figures of a run that match the published formulas', async () => {
    const r = await post({ input: canonical() });
    expect(r.status).toBe(200);
    const f = r.body.figures;
    expect(f.R0).toBeCloseTo(2, 12); // [pub] R0 = β/γ (REFERENCES.md, model)
    // [calc] REFERENCES.md §1: N = 1000, I0 = 1, R0 = 2 → R∞/N = 0.797154 (the finite-I0 first integral).
    expect(f.attackRate).toBeCloseTo(0.797154, 4);
    expect(f.herdImmunityThreshold).toBeCloseTo(0.5, 12); // [pub] 1 − 1/R0, Anderson & May 1991
    // [pub] REFERENCES.md §2 (first integral): I_max = 153.9267 at t ≈ 27.029 for this case.
    expect(f.peakInfectious).toBeCloseTo(153.9267, 2);
    expect(f.peakDay).toBeCloseTo(27.029, 1);
    // [pub] REFERENCES.md §3: r = β − γ (S0 ≈ N) = 0.25 per day; doubling time ln2 / r.
    expect(f.growthRate).toBeCloseTo(0.5 * 999 / 1000 - 0.25, 6);
    expect(f.doublingTime).toBeCloseTo(Math.LN2 / f.growthRate, 10);
    expect(r.body.series).toBeUndefined();
  });

  it('sends the daily curves when asked, with S + I + R = N [mem: RK preserves linear invariants]', async () => {
    const r = await post({ input: canonical({ days: 60, capacity: { admissionFraction: 0.05, lengthOfStay: 5, beds: 4 } }), series: true });
    expect(r.status).toBe(200);
    const s = r.body.series;
    expect(s.t).toHaveLength(61);
    for (let k = 0; k < s.t.length; k++) expect(s.S[k] + s.I[k] + s.R[k]).toBeCloseTo(1000, 9);
    expect(s.bedDemand).toHaveLength(61);
    // Beds exceeded: the first day of the series over 4 beds [calc: read off the returned series].
    const first = s.t.find((_: number, k: number) => s.bedDemand[k] > 4);
    expect(r.body.figures.bedsExceededDay).toBe(first);
  });

  it('lets a supervisor compute (run:compute) too', async () => {
    expect((await post({ input: canonical({ days: 30 }) }, supervisor)).status).toBe(200);
  });

  it('answers 400 with field paths for bad parameters', async () => {
    const r = await post({ input: canonical({ params: { beta: -1, gamma: 0.25 } }) });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('validation_failed');
    expect(Object.keys(r.body.error.fields)).toContain('input.params.beta');

    const seir = await post({ input: canonical({ model: 'SEIR' }) });
    expect(seir.status).toBe(400);
    expect(seir.body.error.fields).toHaveProperty(['input.params.sigma']);

    const tooMany = await post({ input: canonical({ initial: { I: 2000 } }) });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.fields).toHaveProperty(['input.initial.I']);
  });

  it('refuses an unsafe Euler step with the largest safe step (REFERENCES.md §5 counterexample) [pub]', async () => {
    // N = 1000, S0 = I0 = 500, β = 3, γ = 0.1, h = 1 would give S = −250 after one step.
    const r = await post({ input: { model: 'SIR', population: 1000, initial: { I: 500 }, params: { beta: 3, gamma: 0.1 }, method: 'euler', step: 1, days: 10 } });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty(['input.step']);
    // [calc] Euler bound h·max(β, γ) ≤ 1 → h ≤ 1/3 day.
    expect(r.body.error.largestSafeStep).toBeCloseTo(1 / 3, 10);
    expect(r.body.error.message).toMatch(/largest safe step is 0\.3333/);
  });

  it('answers 422 with the reason for a horizon or a step count beyond the limits', async () => {
    const days = await post({ input: canonical({ days: 5000 }) });
    expect(days.status).toBe(422);
    expect(days.body.error.code).toBe('unprocessable');
    expect(days.body.error.fields).toHaveProperty(['input.days']);
    expect(days.body.error.message).toMatch(/3650/);

    const steps = await post({ input: canonical({ days: 3650, step: 0.0001 }) });
    expect(steps.status).toBe(422);
    expect(steps.body.error.fields).toHaveProperty(['input.step']);
    expect(steps.body.error.message).toMatch(/5000000/);
  });

  it('runs an ensemble with bands, and answers 422 for too many runs or too much work', async () => {
    const ok = await post({ input: canonical({ days: 120, step: 0.25 }), ensemble: { ranges: { 'params.beta': [0.45, 0.55] }, runs: 50, seed: 3 } });
    expect(ok.status).toBe(200);
    const e = ok.body.ensemble;
    expect(e.runs).toBe(50);
    expect(e.peakDay.p5).toBeLessThanOrEqual(e.peakDay.p50);
    expect(e.peakDay.p50).toBeLessThanOrEqual(e.peakDay.p95);
    // [pub] REFERENCES.md §2: I_max at β = 0.5 (153.9) lies between those at the ends of the range.
    expect(e.peakInfectious.p5).toBeLessThan(153.93);
    expect(e.peakInfectious.p95).toBeGreaterThan(153.92);

    const runs = await post({ input: canonical(), ensemble: { ranges: { 'params.beta': [0.4, 0.6] }, runs: 50_000 } });
    expect(runs.status).toBe(422);
    expect(runs.body.error.fields).toHaveProperty(['ensemble.runs']);

    const work = await post({ input: canonical({ days: 3650, step: 0.01 }), ensemble: { ranges: { 'params.beta': [0.4, 0.6] }, runs: 1000 } });
    expect(work.status).toBe(422);
    expect(work.body.error.message).toMatch(/limit/);

    const badPath = await post({ input: canonical({ days: 30 }), ensemble: { ranges: { 'params.kappa': [0, 1] }, runs: 10 } });
    expect(badPath.status).toBe(400);
    expect(Object.keys(badPath.body.error.fields)[0]).toMatch(/^ensemble\.ranges\./);
  });

  it('answers 413 for a body over the limit and 400 for malformed JSON', async () => {
    const big = await post({ input: canonical(), pad: 'x'.repeat(300 * 1024) });
    expect(big.status).toBe(413);
    const bad = await call(POST, '/api/runs', { method: 'POST', rawBody: '{"input":', contentType: 'application/json', cookie: field });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid_json');
  });
});
