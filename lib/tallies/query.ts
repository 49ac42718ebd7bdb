/**
 * Query-string schemas of the tally routes, shared by the routes and the client hooks that build
 * the URLs. (They sit here rather than in lib/validation because only the tally routes read them.)
 */
import { z } from 'zod';
import { isoDateSchema, uuidSchema } from '@/lib/validation/common';
import { AppError } from '@/lib/http/errors';

export const TALLY_SORT_KEYS = ['date', '-date', 'site', '-site', 'newCases', '-newCases', 'recordedAt', '-recordedAt', 'updatedAt', '-updatedAt'] as const;

const intParam = (min: number, max: number) => z.coerce.number({ error: 'Must be a number.' }).int('Must be a whole number.').min(min).max(max);

export const tallyListQuerySchema = z.strictObject({
  site: uuidSchema.optional(),
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
  limit: intParam(1, 1000).optional(),
  offset: intParam(0, 10_000_000).optional(),
  sort: z.enum(TALLY_SORT_KEYS).optional(),
});
export type TallyListQuery = z.infer<typeof tallyListQuerySchema>;

export const tallyExportQuerySchema = tallyListQuerySchema.pick({ site: true, from: true, to: true });

export const curveQuerySchema = z.strictObject({
  /** One site's curve instead of the outbreak's. */
  site: uuidSchema.optional(),
  /** The client's calendar day (used when within a day of the server's). */
  today: isoDateSchema.optional(),
});

export const gridQuerySchema = z.strictObject({ from: isoDateSchema.optional(), to: isoDateSchema.optional() });

export const importQuerySchema = z.strictObject({
  mode: z.enum(['preview', 'commit']).default('preview'),
  /** The preview's count of valid rows; a commit that would write another number writes nothing. */
  expect: intParam(0, 1_000_000).optional(),
  today: isoDateSchema.optional(),
});

export const deleteQuerySchema = z.strictObject({ baseVersion: intParam(1, 2_000_000_000) });

const CONFLICT_MESSAGE: Record<string, string> = {
  duplicate_day: 'A tally for this site and day was already recorded with other counts. The recorded one was kept; yours waits on the merge desk.',
  stale_version: 'This tally was changed elsewhere since you opened it. The newer one was kept; yours waits on the merge desk.',
  edit_deleted: 'This tally was deleted elsewhere. Nothing was restored; your change waits on the merge desk.',
};

/**
 * A write's outcome as the routes answer it: applied or unchanged as 200 with the record; a
 * conflict as 409 in the one error shape, carrying the kept record and the conflict row.
 */
export function writeAnswer<T extends { status: string; conflict?: { reason: string } }>(result: T): T {
  if (result.status !== 'conflict') return result;
  const reason = result.conflict?.reason ?? 'stale_version';
  throw new AppError('conflict', CONFLICT_MESSAGE[reason] ?? CONFLICT_MESSAGE.stale_version!, { detail: { ...result } });
}
