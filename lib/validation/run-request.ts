/**
 * The body of POST /api/runs: one ScenarioInput to run on the server, optionally an ensemble over
 * parameter ranges. `input` is checked in two passes by the route: the compute limits first (so a
 * horizon or step count beyond them answers 422 with the reason), then scenarioInputSchema (400 with
 * field paths such as `input.params.beta`).
 */
import { z } from 'zod';

/** Most ensemble runs one request may ask the server for (the engine's own cap is higher). */
export const SERVER_MAX_RUNS = 10_000;
/** Most integration steps one request may cost in all (runs × days / step). */
export const SERVER_MAX_WORK = 20_000_000;

const finite = () => z.number({ error: 'must be a number' }).refine(Number.isFinite, 'must be finite');

export const runRequestSchema = z.object({
  /** A ScenarioInput (lib/validation/scenario.ts); validated by the route, see above. */
  input: z.record(z.string(), z.unknown(), { error: 'must be a scenario object' }),
  /** Return the daily curves (t, S, E, I, R, V, incidence, Rt, bed demand) as arrays. Default false. */
  series: z.boolean().optional(),
  ensemble: z
    .object({
      /** Parameter path (e.g. `params.beta`) → [low, high], drawn by Latin hypercube. */
      ranges: z.record(z.string(), z.tuple([finite(), finite()])),
      /** Runs; the limit SERVER_MAX_RUNS answers 422. */
      runs: z.number({ error: 'must be a number' }).int('must be a whole number').min(1, 'must be ≥ 1'),
      /** PRNG seed; the same seed gives the same bands. Default 1. */
      seed: z.number().int().min(0).max(2 ** 32 - 1).optional(),
    })
    .optional(),
});

export type RunRequest = z.infer<typeof runRequestSchema>;
