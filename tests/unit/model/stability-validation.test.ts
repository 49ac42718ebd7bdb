/** REFERENCES.md §5 (stability and positivity of forward Euler, RK4's bound) and input validation. */
import { describe, expect, it } from 'vitest';
import { ModelError, largestSafeStep, parseScenarioInput, simulate, type ScenarioInput } from '@/lib/model';
import { canonical } from './cases';

function thrown(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(ModelError);
    return e as ModelError;
  }
  throw new Error('expected a ModelError');
}

describe('forward Euler positivity counterexample [pub: standard theory; calc: REFERENCES §5]', () => {
  const bad: ScenarioInput = {
    model: 'SIR',
    population: 1000,
    initial: { I: 500 },
    params: { beta: 3, gamma: 0.1 },
    method: 'euler',
    step: 1,
    days: 30,
  };

  it('a naive Euler step gives S = −250 (the case is a real counterexample)', () => {
    const S = 500;
    const I = 500;
    const naive = S + 1 * (-(3 * S * I) / 1000);
    expect(naive).toBe(-250);
  });

  it('is refused with unsafe_step on field "step", naming the step and the largest safe one', () => {
    const e = thrown(() => simulate(bad));
    expect(e.code).toBe('unsafe_step');
    expect(e.field).toBe('step');
    expect(e.largestSafeStep).toBeCloseTo(1 / 3, 12);
    expect(e.message).toContain('1 day');
    expect(e.message).toContain('0.3333');
  });

  it('runs at the largest safe step with no compartment below zero and nothing clamped', () => {
    const safe = largestSafeStep(parseScenarioInput(bad));
    const run = simulate({ ...bad, step: safe });
    expect(run.warnings.filter((w) => w.code === 'negative_compartment')).toEqual([]);
    for (let k = 0; k < run.t.length; k++) {
      expect(run.S[k]).toBeGreaterThanOrEqual(0);
      expect(run.I[k]).toBeGreaterThanOrEqual(0);
      expect(Math.abs((run.S[k] as number) + (run.I[k] as number) + (run.R[k] as number) - 1000)).toBeLessThan(1e-9);
    }
  });

  it('the decay bound: γh ≤ 1 accepted, γh > 1 refused (I multiplied by 1 − γh each step)', () => {
    const decay: ScenarioInput = { ...canonical, params: { beta: 0, gamma: 1 }, method: 'euler', step: 1, days: 5 };
    const run = simulate(decay);
    expect(run.I[1]).toBe(0);
    const e = thrown(() => simulate({ ...decay, params: { beta: 0, gamma: 1.5 } }));
    expect(e.code).toBe('unsafe_step');
    expect(e.largestSafeStep).toBeCloseTo(1 / 1.5, 12);
  });

  it('contact reductions that hold over the whole horizon relax the bound (β·f)', () => {
    const reduced = { ...bad, interventions: [{ startDay: 0, contactReduction: 0.75 }] };
    expect(largestSafeStep(parseScenarioInput(reduced))).toBeCloseTo(1 / 0.75, 12);
    expect(() => simulate({ ...reduced, params: { beta: 3, gamma: 0.5 } })).not.toThrow();
  });
});

describe('RK4 stability bound γh < 2.7853 [pub: standard theory; REFERENCES §5]', () => {
  const decay: ScenarioInput = { ...canonical, params: { beta: 0, gamma: 2.7 }, step: 1, days: 30 };
  it('γh = 2.7 is accepted and the decay stays positive and shrinking (|R(−2.7)| < 1)', () => {
    const run = simulate(decay);
    const z = -2.7;
    const amp = 1 + z + (z * z) / 2 + (z * z * z) / 6 + (z * z * z * z) / 24;
    expect(Math.abs(amp)).toBeLessThan(1);
    expect(run.I[1]).toBeCloseTo(amp, 12);
    expect(run.I[30]).toBeGreaterThan(0);
    expect(run.I[30]).toBeLessThan(run.I[29] as number);
  });
  it('γh = 2.8 is refused (|R(−2.8)| > 1 would grow), naming the largest safe step', () => {
    const z = -2.8;
    expect(1 + z + (z * z) / 2 + (z * z * z) / 6 + (z * z * z * z) / 24).toBeGreaterThan(1);
    const e = thrown(() => simulate({ ...decay, params: { beta: 0, gamma: 2.8 } }));
    expect(e.code).toBe('unsafe_step');
    expect(e.field).toBe('step');
    expect(e.largestSafeStep).toBeCloseTo(2.785 / 2.8, 12);
    expect(e.largestSafeStep as number).toBeLessThan(2.7853 / 2.8);
  });
});

describe('validation names the bad field', () => {
  const cases: [string, (s: ScenarioInput) => unknown, string][] = [
    ['negative β', (s) => ({ ...s, params: { ...s.params, beta: -0.1 } }), 'params.beta'],
    ['zero γ', (s) => ({ ...s, params: { ...s.params, gamma: 0 } }), 'params.gamma'],
    ['NaN γ', (s) => ({ ...s, params: { ...s.params, gamma: Number.NaN } }), 'params.gamma'],
    ['negative σ', (s) => ({ ...s, model: 'SEIR', params: { ...s.params, sigma: -1 } }), 'params.sigma'],
    ['SEIR without σ', (s) => ({ ...s, model: 'SEIR' }), 'params.sigma'],
    ['SIRS without ω', (s) => ({ ...s, model: 'SIRS' }), 'params.omega'],
    ['I > N', (s) => ({ ...s, initial: { I: 1001 } }), 'initial.I'],
    ['I + R > N', (s) => ({ ...s, initial: { I: 600, R: 600 } }), 'initial'],
    ['negative I', (s) => ({ ...s, initial: { I: -1 } }), 'initial.I'],
    ['E outside SEIR', (s) => ({ ...s, initial: { I: 1, E: 3 } }), 'initial.E'],
    ['zero population', (s) => ({ ...s, population: 0 }), 'population'],
    ['days beyond 3650', (s) => ({ ...s, days: 3651 }), 'days'],
    ['fractional days', (s) => ({ ...s, days: 10.5 }), 'days'],
    ['zero step', (s) => ({ ...s, step: 0 }), 'step'],
    ['more than 5 million steps', (s) => ({ ...s, days: 3650, step: 0.0005 }), 'step'],
    ['unknown method', (s) => ({ ...s, method: 'rk45' }), 'method'],
    ['unknown model', (s) => ({ ...s, model: 'SIS' }), 'model'],
    ['contact reduction > 1', (s) => ({ ...s, interventions: [{ startDay: 1, contactReduction: 1.2 }] }), 'interventions.0.contactReduction'],
    ['end before start', (s) => ({ ...s, interventions: [{ startDay: 5, endDay: 3, contactReduction: 0.2 }] }), 'interventions.0.endDay'],
    ['vaccination atStart > 1', (s) => ({ ...s, vaccination: { atStart: 1.5 } }), 'vaccination.atStart'],
    ['negative daily rate', (s) => ({ ...s, vaccination: { dailyRate: -0.1 } }), 'vaccination.dailyRate'],
    ['zero length of stay', (s) => ({ ...s, capacity: { admissionFraction: 0.1, lengthOfStay: 0, beds: 10 } }), 'capacity.lengthOfStay'],
    ['bad record', (s) => ({ ...s, record: 'hourly' }), 'record'],
    ['tolerance too loose', (s) => ({ ...s, method: 'dopri5', tolerance: 0.5 }), 'tolerance'],
  ];
  for (const [label, mutate, field] of cases) {
    it(`${label} → ${field}`, () => {
      const e = thrown(() => simulate(mutate(canonical) as ScenarioInput));
      expect(e.code).toBe('invalid_input');
      expect(e.field).toBe(field);
      expect(e.fields?.[field]).toBeTruthy();
      expect(e.message.startsWith(field)).toBe(true);
    });
  }
  it('a valid input passes and survives a JSON round trip unchanged', () => {
    const parsed = parseScenarioInput(JSON.parse(JSON.stringify(canonical)));
    expect(parsed).toEqual(canonical);
  });
  it('ModelError survives postMessage as plain data', () => {
    const e = thrown(() => simulate({ ...canonical, params: { beta: -1, gamma: 1 } }));
    const back = ModelError.fromJSON(structuredClone(e.toJSON()));
    expect(back).toBeInstanceOf(ModelError);
    expect(back.field).toBe('params.beta');
    expect(back.code).toBe('invalid_input');
  });
});
