/**
 * A saved Scenario of an outbreak (the `scenarios` table): a name, its ScenarioInput, whether it is
 * the outbreak's official forecast, and notes on how it was made. Shared by the scenario routes,
 * lib/data/scenarios.ts (the client) and the sync push.
 */
import { z } from 'zod';
import { labelSchema, uuidSchema } from './common';
import { scenarioInputSchema } from './scenario';

/** Largest notes object accepted, bytes of JSON (a forecast summary is about 2 KiB). */
export const MAX_NOTES_BYTES = 32 * 1024;

/** A [low, high] range, e.g. p5..p95 of an ensemble. */
const rangeSchema = z.tuple([z.number(), z.number()]);

/** Figures of a forecast ensemble kept with the scenario, so the overview can show them without re-running. */
export const forecastNotesSchema = z.object({
  /** Runs in the ensemble. */
  runs: z.number().int().min(1),
  /** Peak day, days since day 0: median and p5..p95. */
  peakDay: z.number(),
  peakDayRange: rangeSchema,
  /** Peak prevalence (people infectious at once): median and p5..p95. */
  peakInfectious: z.number(),
  peakInfectiousRange: rangeSchema,
  /** Largest median bed demand over the horizon, beds; null without capacity. */
  bedPeak: z.number().nullable(),
  bedPeakRange: rangeSchema.nullable(),
  /** First day bed demand exceeds the beds (median, p5..p95; null = never within the horizon). */
  bedsExceededDay: z.number().nullable(),
  bedsExceededRange: z.tuple([z.number().nullable(), z.number().nullable()]).nullable(),
  /** Fraction of runs in which beds are exceeded. */
  bedsExceededShare: z.number().min(0).max(1).nullable(),
});

/** How a scenario was made: by hand on the scenario screen, or from a Fit on the forecast screen. */
export const scenarioNotesSchema = z
  .object({
    source: z.enum(['manual', 'fit']),
    /** The Fit it came from (source 'fit'). */
    fit: z
      .object({
        /** Last observed day of the data, days since day 0 (the data cut-off). */
        dataUntil: z.number(),
        R0: z.number(),
        R0Range: rangeSchema.nullable(),
        /** Infectious period, days. */
        infectiousPeriod: z.number(),
        infectiousPeriodRange: rangeSchema.nullable(),
        /** Plain-language flags of the fit. */
        flags: z.array(z.string().max(500)).max(20),
      })
      .optional(),
    forecast: forecastNotesSchema.optional(),
    /** Free text. */
    comment: z.string().max(2000).optional(),
  })
  .refine((v) => JSON.stringify(v).length <= MAX_NOTES_BYTES, `Notes must be at most ${MAX_NOTES_BYTES} bytes of JSON.`);

export const scenarioRecordInputSchema = z.object({
  /** Client-made UUID (offline-first); absent = a new scenario with a server-made id. */
  id: uuidSchema.optional(),
  name: labelSchema(120),
  input: scenarioInputSchema,
  /** Make it the outbreak's official forecast (coordinators: forecast:publish). */
  official: z.boolean().optional(),
  notes: scenarioNotesSchema.nullable().optional(),
  /** The server version this change was based on (optimistic concurrency); absent for a new one. */
  baseVersion: z.number().int().min(1).optional(),
});

export const scenarioOfficialSchema = z.object({ official: z.boolean() });

export type ScenarioRecordInput = z.infer<typeof scenarioRecordInputSchema>;
export type ScenarioNotes = z.infer<typeof scenarioNotesSchema>;
export type ForecastNotes = z.infer<typeof forecastNotesSchema>;
