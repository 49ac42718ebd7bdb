/** REFERENCES.md §1–3: final size, herd-immunity threshold, peak, growth rate and doubling time. */
import { describe, expect, it } from 'vitest';
import { bedDemand, finalSize, finalSusceptible, simulate, summarize, type ScenarioInput } from '@/lib/model';
import { canonical } from './cases';

describe('final size z = 1 − exp(−R0·z) [pub: Kermack & McKendrick 1927; z calc, HIT pub: Anderson & May 1991 (mem)]', () => {
  const table: [number, number, number][] = [
    [1.5, 0.582812, 0.333333],
    [2, 0.796812, 0.5],
    [2.5, 0.892645, 0.6],
    [3, 0.94048, 0.666667],
    [4, 0.980173, 0.75],
  ];
  for (const [R0, z, hit] of table) {
    it(`R0 = ${R0}: z = ${z}, threshold = ${hit}`, () => {
      const got = finalSize(R0);
      expect(got).toBeCloseTo(z, 6);
      expect(got - (1 - Math.exp(-R0 * got))).toBeCloseTo(0, 14);
      const input: ScenarioInput = { ...canonical, params: { beta: R0 * 0.25, gamma: 0.25 } };
      const s = summarize(simulate(input), input);
      expect(s.R0).toBeCloseTo(R0, 14);
      expect(s.herdImmunityThreshold).toBeCloseTo(hit, 6);
    });
  }
  it('R0 ≤ 1 has no outbreak: z = 0, threshold 0', () => {
    expect(finalSize(1)).toBe(0);
    expect(finalSize(0.5)).toBe(0);
    const input: ScenarioInput = { ...canonical, params: { beta: 0.2, gamma: 0.25 } };
    expect(summarize(simulate(input), input).herdImmunityThreshold).toBe(0);
  });
  it('a large run approaches z (I0/N = 1e-7)', () => {
    const input: ScenarioInput = { ...canonical, population: 1e7, initial: { I: 1 }, method: 'dopri5', days: 400, tolerance: 1e-10 };
    const s = summarize(simulate(input), input);
    expect(s.attackRate).toBeCloseTo(0.796812, 5);
  });
});

describe('finite-I0 final size: ln(S0/S∞) = (R0/N)(S0 + I0 − S∞) [pub: K&M first integral; calc: REFERENCES §1]', () => {
  const input: ScenarioInput = { ...canonical, method: 'rk4', step: 0.05, days: 300 };
  it('N = 1000, I0 = 1, R0 = 2: R∞/N = 0.797154', () => {
    const Sinf = finalSusceptible(2, 1000, 999, 1);
    expect(1 - Sinf / 1000).toBeCloseTo(0.797154, 6);
    const run = simulate(input);
    expect((run.R[300] as number) / 1000).toBeCloseTo(0.797154, 6);
    const s = summarize(run, input);
    // finalSize counts the initial infected person plus every new infection.
    expect(s.attackRate).toBeCloseTo(0.797154, 6);
    expect(s.finalSize).toBeCloseTo(797.154, 2);
  });
});

describe('peak prevalence [pub: standard first-integral result; calc: REFERENCES §2]', () => {
  const rows: [number, number, number, number, number, number][] = [
    [1000, 1, 0.5, 0.25, 153.9267, 27.029],
    [1000, 10, 0.3, 0.1, 303.8127, 26.633],
  ];
  for (const [N, I0, beta, gamma, Imax, tpeak] of rows) {
    const input: ScenarioInput = {
      model: 'SIR',
      population: N,
      initial: { I: I0 },
      params: { beta, gamma },
      method: 'rk4',
      step: 0.01,
      days: 80,
    };
    it(`N=${N}, I0=${I0}, β=${beta}, γ=${gamma}: I_max = ${Imax} (formula and run)`, () => {
      const R0 = beta / gamma;
      const S0 = N - I0;
      const formula = I0 + S0 - (N / R0) * (1 + Math.log((R0 * S0) / N));
      expect(formula).toBeCloseTo(Imax, 4);
      const s = summarize(simulate(input), input);
      expect(s.peakInfectious).toBeCloseTo(formula, 6);
    });
    it(`t_peak = ${tpeak} against a fine-step run (RK4 h = 0.001, record "step")`, () => {
      const fine = simulate({ ...input, step: 0.001, record: 'step' });
      let k = 0;
      for (let i = 1; i < fine.I.length; i++) if ((fine.I[i] as number) > (fine.I[k] as number)) k = i;
      const tFine = fine.t[k] as number;
      expect(tFine).toBeCloseTo(tpeak, 3);
      // The summary's peak is found on the steps and refined between them, not read off daily samples.
      const s = summarize(simulate(input), input);
      expect(Math.abs(s.peakDay - tFine)).toBeLessThan(1e-3);
      expect(Number.isInteger(s.peakDay)).toBe(false);
    });
    it('a coarse step (h = 0.25) refined by the Hermite fit still lands within 1e-3 day and 1e-3 people', () => {
      const coarse = { ...input, step: 0.25 };
      const s = summarize(simulate(coarse), coarse);
      const R0 = beta / gamma;
      const formula = I0 + (N - I0) - (N / R0) * (1 + Math.log((R0 * (N - I0)) / N));
      expect(Math.abs(s.peakInfectious - formula)).toBeLessThan(1e-3);
      expect(Math.abs(s.peakDay - tpeak)).toBeLessThan(2e-3);
    });
  }
  it('R0·S0/N ≤ 1: the peak is I0 at t = 0', () => {
    const input: ScenarioInput = { ...canonical, params: { beta: 0.2, gamma: 0.25 } };
    const s = summarize(simulate(input), input);
    expect(s.peakDay).toBe(0);
    expect(s.peakInfectious).toBe(1);
  });
  it('the peak is the same whether recorded daily or every step', () => {
    const input: ScenarioInput = { ...canonical, step: 0.1, days: 60 };
    const a = summarize(simulate(input), input);
    const stepInput = { ...input, record: 'step' as const };
    const b = summarize(simulate(stepInput), stepInput);
    expect(a.peakDay).toBe(b.peakDay);
    expect(a.peakInfectious).toBe(b.peakInfectious);
  });
  it('a peak beyond the horizon is flagged', () => {
    const run = simulate({ ...canonical, days: 10 });
    expect(run.warnings.map((w) => w.code)).toContain('peak_at_horizon');
  });
});

/** Least-squares slope of ln I over whole days [a, b]. */
function logSlope(I: Float64Array, a: number, b: number): number {
  let sx = 0, sy = 0, sxx = 0, sxy = 0;
  const n = b - a + 1;
  for (let k = a; k <= b; k++) {
    const y = Math.log(I[k] as number);
    sx += k; sy += y; sxx += k * k; sxy += k * y;
  }
  return (n * sxy - sx * sy) / (n * sxx - sx * sx);
}

describe('early growth rate and doubling time [pub: Wallinga & Lipsitch 2007; calc: REFERENCES §3]', () => {
  it('SIR: r = βS0/N − γ, doubling time ln2/r, R0 = 1 + r/γ; matches the run log-slope', () => {
    const input: ScenarioInput = { ...canonical, population: 1e10, step: 0.05, days: 60 };
    const run = simulate(input);
    const s = summarize(run, input);
    expect(s.growthRate).toBeCloseTo(0.5 * (1 - 1e-10) - 0.25, 12);
    expect(s.doublingTime).toBeCloseTo(Math.LN2 / 0.25, 6);
    expect(1 + s.growthRate / 0.25).toBeCloseTo(2, 6);
    // Days 5–40: past the start, while S/N stays within 1e-5 of 1.
    expect(logSlope(run.I, 5, 40)).toBeCloseTo(s.growthRate, 5);
  });
  it('SEIR β = 0.5, σ = 0.2, γ = 0.25: r = 0.092214 from the formula and the log-slope; (1 + r/σ)(1 + r/γ) = 2', () => {
    const input: ScenarioInput = {
      model: 'SEIR',
      population: 1e9,
      initial: { I: 1, E: 0 },
      params: { beta: 0.5, gamma: 0.25, sigma: 0.2 },
      method: 'rk4',
      step: 0.05,
      days: 150,
    };
    const run = simulate(input);
    const s = summarize(run, input);
    const r = (-(0.2 + 0.25) + Math.sqrt((0.2 - 0.25) ** 2 + 4 * 0.2 * 0.5)) / 2;
    expect(r).toBeCloseTo(0.092214, 6);
    expect(s.growthRate).toBeCloseTo(0.092214, 6);
    expect((1 + s.growthRate / 0.2) * (1 + s.growthRate / 0.25)).toBeCloseTo(2, 6);
    // After the initial transient has died out and before depletion (I < 1e-3·N).
    expect(logSlope(run.I, 60, 120)).toBeCloseTo(0.092214, 5);
    expect(s.doublingTime).toBeCloseTo(Math.LN2 / 0.092214, 3);
  });
  it('no growth: doubling time null', () => {
    const input: ScenarioInput = { ...canonical, params: { beta: 0.2, gamma: 0.25 } };
    const s = summarize(simulate(input), input);
    expect(s.growthRate).toBeLessThan(0);
    expect(s.doublingTime).toBeNull();
  });
});

describe('Rt and bed demand [cp]', () => {
  const input: ScenarioInput = {
    ...canonical,
    step: 0.1,
    days: 100,
    interventions: [{ startDay: 20, endDay: 40, contactReduction: 0.5 }],
    capacity: { admissionFraction: 0.1, lengthOfStay: 5, beds: 8 },
  };
  const run = simulate(input);
  const s = summarize(run, input);
  it('Rt = R0 · factor(t) · S(t)/N', () => {
    expect(s.Rt[0]).toBeCloseTo((2 * 999) / 1000, 12);
    expect(s.Rt[25]).toBeCloseTo((2 * 0.5 * (run.S[25] as number)) / 1000, 12);
    expect(s.Rt[40]).toBeCloseTo((2 * (run.S[40] as number)) / 1000, 12);
  });
  it('bed demand follows dB/dt = a·inflow − B/L: steady inflow q gives B → a·q·L [calc]', () => {
    // Constant new-infection rate: a = 0.1, q = 50/day, L = 5 → B∞ = 25.
    const t = Float64Array.from({ length: 101 }, (_, k) => k);
    const inc = new Float64Array(101).fill(50);
    inc[0] = 0;
    expect(s.bedDemand?.length).toBe(run.t.length);
    const B = bedDemand(t, inc, 0.1, 5);
    expect(B[100]).toBeCloseTo(25, 6);
    // Exact solution of dB/dt = 5 − B/5, B(0) = 0, at t = 5: 25(1 − e^(−1)).
    expect(B[5]).toBeCloseTo(25 * (1 - Math.exp(-1)), 10);
  });
  it('bedsExceededDay is the first output time with demand above beds', () => {
    const B = s.bedDemand as Float64Array;
    const k = B.findIndex((b) => b > 8);
    expect(k).toBeGreaterThan(0);
    expect(s.bedsExceededDay).toBe(run.t[k]);
    const plenty = { ...input, capacity: { admissionFraction: 0.1, lengthOfStay: 5, beds: 1e6 } };
    expect(summarize(simulate(plenty), plenty).bedsExceededDay).toBeNull();
  });
  it('summarize of a Run that crossed postMessage (structured clone) gives the same figures', () => {
    const copy = structuredClone(run);
    const again = summarize(copy, input);
    expect(again.peakDay).toBe(s.peakDay);
    expect(again.peakInfectious).toBe(s.peakInfectious);
  });
});
