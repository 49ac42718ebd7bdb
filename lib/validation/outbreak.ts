import { z } from 'zod';
import { isoDateSchema, labelSchema, populationSchema, uuidSchema, countSchema } from './common';

export const SITE_KINDS = ['camp', 'village', 'school', 'ward', 'clinic', 'other'] as const;
export type SiteKind = (typeof SITE_KINDS)[number];

export const outbreakInputSchema = z.strictObject({
  id: uuidSchema.optional(),
  name: labelSchema(),
  disease: labelSchema(),
  area: labelSchema(),
  population: populationSchema,
  startDate: isoDateSchema,
  beds: countSchema.nullable().optional(),
});
export type OutbreakInput = z.infer<typeof outbreakInputSchema>;

export const teamInputSchema = z.strictObject({
  id: uuidSchema.optional(),
  outbreakId: uuidSchema,
  name: labelSchema(),
});
export type TeamInput = z.infer<typeof teamInputSchema>;

export const siteInputSchema = z.strictObject({
  id: uuidSchema.optional(),
  outbreakId: uuidSchema,
  teamId: uuidSchema.nullable().optional(),
  name: labelSchema(),
  kind: z.enum(SITE_KINDS).default('other'),
  population: populationSchema,
});
export type SiteInput = z.infer<typeof siteInputSchema>;
