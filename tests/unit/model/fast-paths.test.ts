/**
 * The engine's fast paths must give the very numbers of the plain paths, not merely close ones:
 * - simulate() with dopri5 runs the per-model Dormand–Prince intervals; here a driver written in this
 *   file steps the same segments with the generic `dopri5Interval` (whole state vector, RHS callback)
 *   and every output must be bit-identical [calc: two implementations of one method].
 * - ensemble() integrates members two at a time straight into its band matrices; here each member is
 *   run alone with simulate() + summarize() and the bands are reduced by a plain sort and the type-7
 *   percentile rule [cp: Hyndman & Fan type 7, as documented in ensemble.ts], and must be equal.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  ensembleFromSamples, parseScenarioInput, scenarioInputSchema, simulate, summarize, type EnsembleResult, type ParamSample, type Percentiles, type Run,
  type ScenarioInput,
} from '@/lib/model';
import { Dopri5State, dopri5Interval, type StepSink } from '@/lib/model/dopri5';
import { variantPasses } from '@/lib/model/ensemble';
import { PK_LEN, P_BN, P_G, P_LEN, P_N, P_NU, P_OM, P_SIG, Y_C, Y_E, Y_I, Y_LEN, Y_R, Y_S, Y_V, initPeak, rhsSEIR, rhsSIR, rhsSIRS } from '@/lib/model/kernels';
import { initialStateInto, segmentsOf, switchTimes } from '@/lib/model/simulate';
import { canonical, intervened, seir, sirs, vaccinated } from './cases';

/** Rows [t, S, E, I, R, V, C] pushed by the generic integrator. */
class Rows implements StepSink {
  rows: number[][] = [];
  push(t: number, y: Float64Array): void {
    this.rows.push([t, y[Y_S] as number, y[Y_E] as number, y[Y_I] as number, y[Y_R] as number, y[Y_V] as number, y[Y_C] as number]);
  }
}

/** simulate()'s dopri5 segment loop, but with the generic interval function. */
function genericDopri5(input: ScenarioInput): { rows: number[][]; pk: Float64Array; steps: number } {
  const rhs = input.model === 'SEIR' ? rhsSEIR : input.model === 'SIRS' ? rhsSIRS : rhsSIR;
  const y = new Float64Array(Y_LEN);
  initialStateInto(y, input);
  const pk = new Float64Array(PK_LEN);
  initPeak(pk, y);
  const p = new Float64Array(P_LEN);
  p[P_N] = input.population;
  p[P_G] = input.params.gamma;
  p[P_SIG] = input.params.sigma ?? 0;
  p[P_OM] = input.params.omega ?? 0;
  const tol = input.tolerance ?? 1e-8;
  const st = new Dopri5State(input.step, tol, tol);
  const out = new Rows();
  out.push(0, y);
  const { nSeg, segEnd, segBN, segNU } = segmentsOf(input, switchTimes(input));
  const daily = (input.record ?? 'daily') === 'daily';
  for (let i = 0; i < nSeg; i++) {
    p[P_BN] = segBN[i] as number;
    p[P_NU] = segNU[i] as number;
    const a = i === 0 ? 0 : (segEnd[i - 1] as number);
    if (daily) {
      dopri5Interval(st, rhs, y, p, a, segEnd[i] as number, pk, null, out);
    } else {
      // simulate() cuts step records at every whole day too.
      for (let d = Math.floor(a); d < (segEnd[i] as number); d++) {
        const lo = Math.max(a, d);
        const hi = Math.min(segEnd[i] as number, d + 1);
        if (hi > lo) dopri5Interval(st, rhs, y, p, lo, hi, pk, out);
      }
    }
  }
  return { rows: out.rows, pk, steps: st.steps };
}

const column = (rows: number[][], c: number) => rows.map((r) => r[c] as number);

const cases: [string, ScenarioInput][] = [
  ['SIR', { ...canonical, days: 120 }],
  ['SEIR', seir],
  ['SIRS', sirs],
  ['SIR with vaccination', vaccinated],
  ['SEIR with two overlapping interventions', intervened],
];

describe('per-model dopri5 = generic dopri5, bit for bit [calc]', () => {
  for (const [label, base] of cases) {
    for (const tol of [1e-6, 1e-10]) {
      it(`${label}, tolerance ${tol}, daily records`, () => {
        const input: ScenarioInput = { ...base, method: 'dopri5', step: 0.5, tolerance: tol };
        const run = simulate(input);
        const ref = genericDopri5(input);
        expect(ref.steps).toBeGreaterThan(10);
        expect(Array.from(run.t)).toEqual(column(ref.rows, 0));
        expect(Array.from(run.S)).toEqual(column(ref.rows, 1));
        if (input.model === 'SEIR') expect(Array.from(run.E ?? [])).toEqual(column(ref.rows, 2));
        expect(Array.from(run.I)).toEqual(column(ref.rows, 3));
        expect(Array.from(run.R)).toEqual(column(ref.rows, 4));
        if (run.V) expect(Array.from(run.V)).toEqual(column(ref.rows, 5));
        const C = column(ref.rows, 6);
        expect(Array.from(run.incidence)).toEqual(C.map((c, k) => (k === 0 ? 0 : c - (C[k - 1] as number))));
      });
    }
    it(`${label}, step records`, () => {
      const input: ScenarioInput = { ...base, method: 'dopri5', step: 0.5, tolerance: 1e-8, record: 'step' };
      const run = simulate(input);
      const ref = genericDopri5(input);
      expect(Array.from(run.t)).toEqual(column(ref.rows, 0));
      expect(Array.from(run.I)).toEqual(column(ref.rows, 3));
      expect(Array.from(run.R)).toEqual(column(ref.rows, 4));
    });
  }
});

/** Type-7 percentile of ascending `s`; a "never" (+Infinity) upper neighbour keeps the band at never. */
function q7(s: number[], q: number): number {
  const pos = q * (s.length - 1);
  const lo = Math.floor(pos);
  const frac = pos - lo;
  const a = s[lo] as number;
  if (frac === 0 || lo + 1 >= s.length) return a;
  const b = s[lo + 1] as number;
  return b === Infinity ? Infinity : a + frac * (b - a);
}
const QS = { p5: 0.05, p25: 0.25, p50: 0.5, p75: 0.75, p95: 0.95 } as const;
const scalar = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return { p5: q7(s, QS.p5), p25: q7(s, QS.p25), p50: q7(s, QS.p50), p75: q7(s, QS.p75), p95: q7(s, QS.p95) };
};
function series(cols: Float64Array[]): Percentiles<number[]> {
  const out: Percentiles<number[]> = { p5: [], p25: [], p50: [], p75: [], p95: [] };
  const times = (cols[0] as Float64Array).length;
  for (let k = 0; k < times; k++) {
    const s = cols.map((c) => c[k] as number).sort((a, b) => a - b);
    for (const key of Object.keys(QS) as (keyof typeof QS)[]) out[key].push(q7(s, QS[key]));
  }
  return out;
}
const plain = (b: Percentiles<Float64Array> | undefined) =>
  b && { p5: Array.from(b.p5), p25: Array.from(b.p25), p50: Array.from(b.p50), p75: Array.from(b.p75), p95: Array.from(b.p95) };

/** The sample applied by hand, as ensemble.ts documents it (a missing vaccination block is created). */
function applySample(input: ScenarioInput, s: ParamSample): ScenarioInput {
  const v: ScenarioInput = structuredClone(input);
  for (const [path, value] of Object.entries(s)) {
    const [head, a, b] = path.split('.') as [string, string, string | undefined];
    const iv = head === 'interventions' ? v.interventions?.[Number(a)] : undefined;
    if (head === 'population') v.population = value;
    else if (head === 'params') (v.params as Record<string, number>)[a] = value;
    else if (head === 'initial') (v.initial as Record<string, number>)[a] = value;
    else if (iv) (iv as unknown as Record<string, number>)[b as string] = value;
    else if (head === 'vaccination') v.vaccination = { ...v.vaccination, [a]: value };
    else if (head === 'capacity') v.capacity = { ...v.capacity, [a]: value } as ScenarioInput['capacity'];
    else throw new Error(`test helper cannot set ${path}`);
  }
  return v;
}

/** The ensemble from its definition: one simulate() + summarize() per member, bands by plain sorting. */
function reference(input: ScenarioInput, samples: ParamSample[]) {
  const runs: Run[] = [];
  const sums = samples.map((s) => {
    const v = applySample(input, s);
    const run = simulate(v);
    runs.push(run);
    return summarize(run, v);
  });
  const bands = {
    I: series(runs.map((r) => r.I)),
    incidence: series(runs.map((r) => r.incidence)),
    bedDemand: input.capacity ? series(sums.map((s) => s.bedDemand as Float64Array)) : undefined,
  };
  const exceeded = sums.map((s) => s.bedsExceededDay ?? Infinity);
  return {
    t: Array.from((runs[0] as Run).t),
    bands,
    peakDay: scalar(sums.map((s) => s.peakDay)),
    peakInfectious: scalar(sums.map((s) => s.peakInfectious)),
    bedsExceededDay: input.capacity
      ? { ...scalar(exceeded), share: exceeded.filter((d) => d !== Infinity).length / samples.length }
      : undefined,
  };
}

function expectSameEnsemble(r: EnsembleResult, ref: ReturnType<typeof reference>, runs: number): void {
  expect(r.runs).toBe(runs);
  expect(Array.from(r.t)).toEqual(ref.t);
  expect(plain(r.bands.I)).toEqual(ref.bands.I);
  expect(plain(r.bands.incidence)).toEqual(ref.bands.incidence);
  expect(plain(r.bands.bedDemand)).toEqual(ref.bands.bedDemand);
  expect(r.peakDay).toEqual(ref.peakDay);
  expect(r.peakInfectious).toEqual(ref.peakInfectious);
  expect(r.bedsExceededDay).toEqual(ref.bedsExceededDay);
}

/** `n` draws spread over [lo, hi] in a scrambled order (so members do not come sorted). */
const spread = (n: number, lo: number, hi: number) =>
  Array.from({ length: n }, (_, i) => lo + ((hi - lo) * ((i * 17) % n)) / (n - 1));

describe('ensemble fast path = simulate() + summarize() per member, reduced by plain sorting [cp]', () => {
  const capacity = { admissionFraction: 0.05, lengthOfStay: 6, beds: 40 };
  const n = 41; // odd: the last member runs alone
  const betas = spread(n, 0.4, 0.6);
  const gammas = spread(n, 0.2, 0.3).reverse();
  const both = betas.map((b, i) => ({ 'params.beta': b, 'params.gamma': gammas[i] as number }));
  const table: [string, ScenarioInput, ParamSample[]][] = [
    ['SIR rk4 h = 0.1 (two lanes)', { ...canonical, step: 0.1, days: 120, capacity }, both],
    ['SIR rk4 h = 0.3 (tail step every day)', { ...canonical, step: 0.3, days: 90, capacity }, both],
    ['SEIR rk4 with interventions (two lanes, shared switches)', { ...intervened, capacity }, both],
    ['SIRS rk4 (two lanes keep R)', { ...sirs, capacity }, both],
    ['SIR rk4 with a vaccination campaign (single lanes while ν > 0)', { ...vaccinated, capacity }, both],
    [
      'SEIR rk4, intervention start varied (switch times differ, single lanes)',
      { ...seir, interventions: [{ startDay: 20, endDay: 50, contactReduction: 0.5 }], capacity },
      betas.map((b, i) => ({ 'params.beta': b, 'interventions.0.startDay': 10 + (i % 7) * 2.5 })),
    ],
    ['SIR euler (single-lane kernels)', { ...canonical, method: 'euler', step: 0.25, days: 120, capacity }, both],
    ['SIR dopri5 (through the driver)', { ...canonical, method: 'dopri5', step: 0.5, days: 120, capacity }, both],
    ['varied initial I (day-0 values differ)', { ...canonical, step: 0.1, days: 100, capacity }, betas.map((b, i) => ({ 'params.beta': b, 'initial.I': 1 + (i % 5) }))],
  ];
  for (const [label, input, samples] of table) {
    it(label, () => {
      expectSameEnsemble(ensembleFromSamples(input, samples), reference(input, samples), samples.length);
    });
  }
  it('many members (order changes on most days, the merge-sort fallback on day 1)', () => {
    const m = 400;
    const bs = spread(m, 0.3, 0.7);
    const gs = spread(m, 0.15, 0.35).reverse();
    const samples = bs.map((b, i) => ({ 'params.beta': b, 'params.gamma': gs[i] as number }));
    const input: ScenarioInput = { ...canonical, step: 0.2, days: 150, capacity };
    expectSameEnsemble(ensembleFromSamples(input, samples), reference(input, samples), m);
  });
});

describe('ensemble variants skip the schema only when it would accept them [calc: scenarioInputSchema]', () => {
  const bases: ScenarioInput[] = [
    { ...canonical, capacity: { admissionFraction: 0.05, lengthOfStay: 6, beds: 40 } },
    { ...intervened, vaccination: { atStart: 0.1, dailyRate: 0.01, startDay: 10 } },
    { ...sirs, initial: { I: 10, R: 4000 } },
    { ...seir, population: 30 },
  ];
  const paths = [
    'population', 'initial.I', 'initial.E', 'initial.R', 'params.beta', 'params.gamma', 'params.sigma',
    'params.omega', 'vaccination.atStart', 'vaccination.dailyRate', 'vaccination.startDay',
    'capacity.admissionFraction', 'capacity.lengthOfStay', 'capacity.beds', 'interventions.0.startDay',
    'interventions.0.endDay', 'interventions.1.contactReduction',
  ];
  // Bounds of the schema and their neighbours, plus ordinary values.
  const edges = [-1, -1e-300, 0, 1e-300, 0.5, 1, 1 + 1e-15, 2, 10, 11, 30, 45, 365, 366, 999, 1000, 1001, 1e10, 1.0000001e10];
  const value = fc.oneof(fc.constantFrom(...edges), fc.double({ min: -10, max: 2000, noNaN: true }));
  it('never accepts a variant the schema rejects, and accepts ordinary ones', () => {
    let skipped = 0;
    fc.assert(
      fc.property(fc.constantFrom(...bases), fc.uniqueArray(fc.constantFrom(...paths), { minLength: 1, maxLength: 3 }), fc.array(value, { minLength: 3, maxLength: 3 }), (base, keys, values) => {
        const sample: Record<string, number> = {};
        keys.forEach((k, i) => (sample[k] = values[i] as number));
        let variant: ScenarioInput;
        try {
          variant = applySample({ ...parseScenarioInput(base), record: 'daily' }, sample);
        } catch {
          return; // a path this base lacks (e.g. interventions on SIR): setPath refuses it before any check
        }
        if (variantPasses(variant, keys)) {
          skipped++;
          expect(scenarioInputSchema.safeParse(variant).success).toBe(true);
        }
      }),
      { numRuns: 3000, seed: 20260 },
    );
    expect(skipped).toBeGreaterThan(300);
  });
  it('names the field of a bad draw exactly as the schema does', () => {
    const base = bases[1] as ScenarioInput;
    expect(() => ensembleFromSamples(base, [{ 'interventions.0.endDay': 5 }])).toThrow(/interventions\.0\.endDay/);
    expect(() => ensembleFromSamples(base, [{ 'initial.I': 60_000 }])).toThrow(/initial\.I/);
    expect(() => ensembleFromSamples(canonical, [{ 'initial.E': 3 }])).toThrow(/initial\.E/);
    expect(() => ensembleFromSamples(canonical, [{ 'capacity.beds': 3 }])).toThrow(/capacity/);
  });
});
