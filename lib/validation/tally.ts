import { z } from 'zod';
import { countSchema, isoDateSchema, uuidSchema } from './common';

/**
 * A tally as a form, a route, a CSV row and a sync payload send it. The note is short free text
 * about the count; it must not hold patient data (the form says so).
 */
export const tallyInputSchema = z.strictObject({
  id: uuidSchema.optional(),
  siteId: uuidSchema,
  date: isoDateSchema,
  newCases: countSchema,
  recoveries: countSchema.nullable().optional(),
  deaths: countSchema.nullable().optional(),
  admissions: countSchema.nullable().optional(),
  note: z.string().trim().max(280, 'At most 280 characters.')
    // eslint-disable-next-line no-control-regex
    .refine((s) => !/[\u0000-\u0008\u000b-\u001f\u007f\u202a-\u202e\u2066-\u2069]/.test(s), 'Contains control characters.')
    .nullable().optional(),
  /** The server version this edit is based on; absent or null for a new tally. */
  baseVersion: z.number().int().min(1).nullable().optional(),
});
export type TallyInput = z.infer<typeof tallyInputSchema>;
