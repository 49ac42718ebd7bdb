/**
 * The one schema of a Scenario's numerical input (`ScenarioInput`), shared by the scenario form, the
 * API route, the forecast worker and the engine in lib/model. Plain JSON: no dates, no typed arrays.
 *
 * Limits are "sane" bounds, not epidemiological claims: they keep a run finite on a field tablet.
 */
import { z } from 'zod';

/** Longest horizon accepted, days (ten years). */
export const MAX_DAYS = 3650;
/** Most fixed steps one run may take (days / step). */
export const MAX_STEPS = 5_000_000;
/** Most interventions one scenario may carry. */
export const MAX_INTERVENTIONS = 64;

const finite = () => z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be finite');
const nonNegative = () => finite().min(0, 'must be ≥ 0');
const positive = () => finite().gt(0, 'must be > 0');
const fraction = () => finite().min(0, 'must be ≥ 0').max(1, 'must be ≤ 1');

export const modelKindSchema = z.enum(['SIR', 'SEIR', 'SIRS']);
export const methodSchema = z.enum(['euler', 'rk4', 'dopri5']);

export const interventionSchema = z
  .object({
    /** Day the intervention starts (days since t = 0; need not be whole). */
    startDay: nonNegative(),
    /** Day it ends (exclusive); absent = until the horizon. */
    endDay: nonNegative().optional(),
    /** Fraction by which contacts (β) are cut while active, 0..1. */
    contactReduction: fraction(),
  })
  .superRefine((v, ctx) => {
    if (v.endDay !== undefined && v.endDay <= v.startDay) {
      ctx.addIssue({ code: 'custom', path: ['endDay'], message: 'must be after startDay' });
    }
  });

export const scenarioInputSchema = z
  .object({
    model: modelKindSchema,
    /** N, people. */
    population: positive().max(1e10, 'must be ≤ 1e10'),
    /** Initial compartments, people. S = N − I − E − R (before vaccination at start). */
    initial: z.object({
      I: nonNegative(),
      E: nonNegative().optional(),
      R: nonNegative().optional(),
    }),
    params: z.object({
      /** Transmission rate β, per day. */
      beta: nonNegative().max(1000, 'must be ≤ 1000 per day'),
      /** Recovery rate γ, per day (1 / infectious period). */
      gamma: positive().max(1000, 'must be ≤ 1000 per day'),
      /** 1 / latent period, per day. Required for SEIR. */
      sigma: positive().max(1000, 'must be ≤ 1000 per day').optional(),
      /** Waning rate R → S, per day. Required for SIRS. */
      omega: nonNegative().max(1000, 'must be ≤ 1000 per day').optional(),
    }),
    vaccination: z
      .object({
        /** Fraction of S moved to V at t = 0. */
        atStart: fraction().optional(),
        /** Fraction of the current S vaccinated per day (dV/dt = rate · S), per day. */
        dailyRate: nonNegative().max(10, 'must be ≤ 10 per day').optional(),
        /** Day the daily campaign starts (days; default 0). */
        startDay: nonNegative().optional(),
      })
      .optional(),
    interventions: z.array(interventionSchema).max(MAX_INTERVENTIONS).optional(),
    capacity: z
      .object({
        /** Fraction of new infections admitted to a bed. */
        admissionFraction: fraction(),
        /** Mean length of stay, days. */
        lengthOfStay: positive().max(365, 'must be ≤ 365 days'),
        /** Beds available, beds (people). */
        beds: nonNegative(),
      })
      .optional(),
    method: methodSchema,
    /** Days: the fixed step (euler, rk4) or the first step (dopri5). */
    step: positive().max(1, 'must be ≤ 1 day'),
    /** Horizon, whole days. */
    days: z
      .number({ error: 'must be a number' })
      .int('must be a whole number of days')
      .min(1, 'must be ≥ 1')
      .max(MAX_DAYS, `must be ≤ ${MAX_DAYS}`),
    /** Output at every whole day (default) or at every integration step. */
    record: z.enum(['daily', 'step']).optional(),
    /**
     * dopri5 only: relative tolerance (fraction); the absolute tolerance is tolerance × 1 person.
     * Default 1e-8.
     */
    tolerance: finite().min(1e-14, 'must be ≥ 1e-14').max(1e-2, 'must be ≤ 1e-2').optional(),
  })
  .superRefine((v, ctx) => {
    const occupied = v.initial.I + (v.initial.E ?? 0) + (v.initial.R ?? 0);
    if (v.initial.I > v.population) {
      ctx.addIssue({ code: 'custom', path: ['initial', 'I'], message: 'must be ≤ population' });
    } else if (occupied > v.population * (1 + 1e-12)) {
      ctx.addIssue({ code: 'custom', path: ['initial'], message: 'I + E + R must be ≤ population' });
    }
    if (v.model === 'SEIR' && v.params.sigma === undefined) {
      ctx.addIssue({ code: 'custom', path: ['params', 'sigma'], message: 'is required for SEIR' });
    }
    if (v.model !== 'SEIR' && (v.initial.E ?? 0) > 0) {
      ctx.addIssue({ code: 'custom', path: ['initial', 'E'], message: 'only SEIR has an E compartment' });
    }
    if (v.model === 'SIRS' && v.params.omega === undefined) {
      ctx.addIssue({ code: 'custom', path: ['params', 'omega'], message: 'is required for SIRS' });
    }
    if (v.method !== 'dopri5' && v.days / v.step > MAX_STEPS) {
      ctx.addIssue({
        code: 'custom',
        path: ['step'],
        message: `gives ${Math.ceil(v.days / v.step)} steps; at most ${MAX_STEPS} (use a step ≥ ${v.days / MAX_STEPS})`,
      });
    }
  });

export type ScenarioInput = z.infer<typeof scenarioInputSchema>;
export type ModelKind = z.infer<typeof modelKindSchema>;
export type IntegrationMethod = z.infer<typeof methodSchema>;
export type Intervention = z.infer<typeof interventionSchema>;
