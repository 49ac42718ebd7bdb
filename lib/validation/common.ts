import { z } from 'zod';

/** A calendar day `YYYY-MM-DD` that exists (2026-02-30 is refused). No time, no time zone. */
export const isoDateSchema = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-14.')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
  }, 'This date does not exist.');

export const uuidSchema = z.string().uuid('Must be an id (UUID).');

/** Short human text: trimmed, no control characters (NUL, bidi overrides) that hide what is stored. */
export const labelSchema = (max = 120) =>
  z
    .string()
    .trim()
    .min(1, 'Required.')
    .max(max, `At most ${max} characters.`)
    // eslint-disable-next-line no-control-regex
    .refine((s) => !/[\u0000-\u001f\u007f\u202a-\u202e\u2066-\u2069]/.test(s), 'Contains control characters.');

/** A whole number of people or cases: 0 … 1e9. */
export const countSchema = z
  .number({ error: 'Must be a number.' })
  .int('Must be a whole number.')
  .min(0, 'Cannot be negative.')
  .max(1_000_000_000, 'Too large.');

export const populationSchema = z
  .number({ error: 'Must be a number.' })
  .int('Must be a whole number.')
  .min(1, 'Must be at least 1.')
  .max(2_000_000_000, 'Too large.');

export const emailSchema = z.string().trim().toLowerCase().max(254).email('Not an e-mail address.');
