/** Ensembles: reproducible seeded Latin hypercube, ordered bands, degenerate ranges [cp]. */
import { describe, expect, it } from 'vitest';
import {
  ModelError, ensemble, ensembleFromSamples, latinHypercube, mulberry32, simulate, summarize, type EnsembleResult,
  type ScenarioInput,
} from '@/lib/model';
import { canonical } from './cases';

const input: ScenarioInput = {
  ...canonical,
  step: 0.25,
  days: 120,
  capacity: { admissionFraction: 0.05, lengthOfStay: 6, beds: 5 },
};
const ranges = { 'params.beta': [0.4, 0.6], 'params.gamma': [0.2, 0.3] } as const;

function ordered(r: EnsembleResult): void {
  const series = [r.bands.I, r.bands.incidence, r.bands.bedDemand];
  for (const b of series) {
    expect(b).toBeDefined();
    if (!b) continue;
    for (let k = 0; k < b.p50.length; k++) {
      expect(b.p5[k]).toBeLessThanOrEqual(b.p25[k] as number);
      expect(b.p25[k]).toBeLessThanOrEqual(b.p50[k] as number);
      expect(b.p50[k]).toBeLessThanOrEqual(b.p75[k] as number);
      expect(b.p75[k]).toBeLessThanOrEqual(b.p95[k] as number);
    }
  }
  for (const p of [r.peakDay, r.peakInfectious]) {
    expect(p.p5).toBeLessThanOrEqual(p.p25);
    expect(p.p25).toBeLessThanOrEqual(p.p50);
    expect(p.p50).toBeLessThanOrEqual(p.p75);
    expect(p.p75).toBeLessThanOrEqual(p.p95);
  }
}

describe('random numbers', () => {
  it('mulberry32 is seeded, in [0, 1), and roughly uniform', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    let sum = 0;
    for (let i = 0; i < 10000; i++) {
      const x = a();
      expect(x).toBe(b());
      expect(x).toBeGreaterThanOrEqual(0);
      expect(x).toBeLessThan(1);
      sum += x;
    }
    expect(sum / 10000).toBeCloseTo(0.5, 1);
    expect(mulberry32(1)()).not.toBe(mulberry32(2)());
  });
  it('Latin hypercube puts exactly one point in each stratum of each dimension', () => {
    const runs = 37;
    const u = latinHypercube(runs, 3, mulberry32(7));
    for (let j = 0; j < 3; j++) {
      const strata = new Set<number>();
      for (let i = 0; i < runs; i++) strata.add(Math.floor((u[i * 3 + j] as number) * runs));
      expect(strata.size).toBe(runs);
    }
  });
});

describe('ensemble', () => {
  it('is reproducible for one seed and differs for another', () => {
    const a = ensemble(input, ranges, 60, 123);
    const b = ensemble(input, ranges, 60, 123);
    const c = ensemble(input, ranges, 60, 124);
    expect(Array.from(a.bands.I.p50)).toEqual(Array.from(b.bands.I.p50));
    expect(a.peakDay).toEqual(b.peakDay);
    expect(Array.from(a.bands.I.p50)).not.toEqual(Array.from(c.bands.I.p50));
    // Key order of the ranges does not change the draws.
    const swapped = ensemble(input, { 'params.gamma': [0.2, 0.3], 'params.beta': [0.4, 0.6] }, 60, 123);
    expect(swapped.peakInfectious).toEqual(a.peakInfectious);
  });

  it('bands are ordered p5 ≤ p25 ≤ p50 ≤ p75 ≤ p95 and have the run times', () => {
    const r = ensemble(input, ranges, 100, 9);
    expect(r.runs).toBe(100);
    expect(r.t.length).toBe(121);
    ordered(r);
    expect(r.bedsExceededDay).toBeDefined();
    expect(r.bedsExceededDay?.share).toBeGreaterThan(0);
    expect((r.bands.I.p95[40] as number) - (r.bands.I.p5[40] as number)).toBeGreaterThan(1);
  });

  it('zero-width ranges give the deterministic run in every band', () => {
    const r = ensemble(input, { 'params.beta': [0.5, 0.5], 'initial.I': [1, 1] }, 20, 5);
    const run = simulate(input);
    const s = summarize(run, input);
    for (const q of ['p5', 'p25', 'p50', 'p75', 'p95'] as const) {
      expect(Array.from(r.bands.I[q])).toEqual(Array.from(run.I));
      expect(Array.from(r.bands.incidence[q])).toEqual(Array.from(run.incidence));
      expect(Array.from(r.bands.bedDemand?.[q] ?? [])).toEqual(Array.from(s.bedDemand ?? []));
      expect(r.peakDay[q]).toBe(s.peakDay);
      expect(r.peakInfectious[q]).toBe(s.peakInfectious);
      expect(r.bedsExceededDay?.[q]).toBe(s.bedsExceededDay);
    }
  });

  it('the median peak lies between the peaks of the extreme corners [calc: monotone in β]', () => {
    const r = ensemble(input, { 'params.beta': [0.45, 0.55] }, 200, 3);
    const lo = { ...input, params: { beta: 0.45, gamma: 0.25 } };
    const hi = { ...input, params: { beta: 0.55, gamma: 0.25 } };
    const pLo = summarize(simulate(lo), lo).peakInfectious;
    const pHi = summarize(simulate(hi), hi).peakInfectious;
    expect(r.peakInfectious.p5).toBeGreaterThan(pLo);
    expect(r.peakInfectious.p95).toBeLessThan(pHi);
    const mid = { ...input, params: { beta: 0.5, gamma: 0.25 } };
    // Peak is near-linear in β over this range, so the median run is close to the middle run.
    expect(Math.abs(r.peakInfectious.p50 - summarize(simulate(mid), mid).peakInfectious)).toBeLessThan(0.05 * (pHi - pLo));
  });

  it('reports progress about every 2 % and ends at total', () => {
    const calls: [number, number][] = [];
    ensemble(input, ranges, 200, 1, (d, t) => calls.push([d, t]));
    expect(calls.length).toBe(50);
    expect(calls[calls.length - 1]).toEqual([200, 200]);
    for (let i = 1; i < calls.length; i++) expect((calls[i] as [number, number])[0]).toBeGreaterThan((calls[i - 1] as [number, number])[0]);
  });

  it('rejects unknown paths, bad ranges and bad run counts, naming them', () => {
    const field = (fn: () => unknown) => {
      try {
        fn();
      } catch (e) {
        expect(e).toBeInstanceOf(ModelError);
        return (e as ModelError).field;
      }
      return 'no error';
    };
    expect(field(() => ensemble(input, { 'params.delta': [0, 1] }, 10, 1))).toBe('ranges.params.delta');
    expect(field(() => ensemble(input, { 'params.beta': [0.6, 0.4] }, 10, 1))).toBe('ranges.params.beta');
    expect(field(() => ensemble(input, ranges, 0, 1))).toBe('runs');
    expect(field(() => ensemble(input, { 'interventions.0.contactReduction': [0, 0.5] }, 10, 1))).toBe(
      'samples.0.interventions.0.contactReduction',
    );
    // A draw that breaks the schema is named by the scenario field.
    expect(field(() => ensemble(input, { 'params.gamma': [-1, -0.5] }, 10, 1))).toBe('params.gamma');
  });
});

describe('ensembleFromSamples', () => {
  it('runs each explicit sample; the bands bracket the samples', () => {
    const samples = [0.4, 0.45, 0.5, 0.55, 0.6].map((beta) => ({ 'params.beta': beta }));
    const r = ensembleFromSamples(input, samples);
    expect(r.runs).toBe(5);
    ordered(r);
    const peaks = samples.map((smp) => {
      const v = { ...input, params: { beta: smp['params.beta'], gamma: 0.25 } };
      return summarize(simulate(v), v).peakInfectious;
    });
    // Five values: p50 is the third order statistic exactly (linear-interpolation percentiles).
    expect(r.peakInfectious.p50).toBe([...peaks].sort((a, b) => a - b)[2]);
    expect(r.peakInfectious.p25).toBe([...peaks].sort((a, b) => a - b)[1]);
  });
  it('can vary an intervention and a vaccination block that the input lacks', () => {
    const withIv: ScenarioInput = { ...input, interventions: [{ startDay: 20, contactReduction: 0.3 }] };
    const r = ensembleFromSamples(withIv, [
      { 'interventions.0.contactReduction': 0.1, 'vaccination.atStart': 0.2 },
      { 'interventions.0.contactReduction': 0.5, 'vaccination.atStart': 0.2 },
    ]);
    expect(r.peakInfectious.p5).toBeLessThan(r.peakInfectious.p95);
  });
});
