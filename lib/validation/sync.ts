/**
 * The sync protocol at the boundary (SYNC.md): the push body, the pull query, device registration
 * and merge-desk settlement. Shared by the routes and the sync client.
 */
import { z } from 'zod';
import { uuidSchema } from './common';

/** Most mutations one push may carry. */
export const MAX_PUSH_BATCH = 500;
/** Largest pull page, changes. */
export const MAX_PULL_LIMIT = 2000;
export const DEFAULT_PULL_LIMIT = 500;
/** Push body limit, bytes: 500 mutations of about 1 KiB each, with room. */
export const PUSH_MAX_BYTES = 4 * 1024 * 1024;

export const SYNC_ENTITIES = ['tally', 'scenario'] as const;
export type SyncEntity = (typeof SYNC_ENTITIES)[number];

/** A device id: a UUID made once per installation. */
export const deviceIdSchema = uuidSchema;

export const mutationSchema = z.strictObject({
  mutationId: uuidSchema,
  /** Per-device counter, strictly increasing by 1. */
  seq: z.number().int().min(1).max(2_000_000_000),
  /** A name the server may not know is answered `rejected` (entity_not_supported), not refused. */
  entity: z.string().min(1).max(32),
  entityId: uuidSchema,
  op: z.enum(['upsert', 'delete']),
  /** The server version the device last saw; null for a record new on the device. */
  baseVersion: z.number().int().min(1).nullable(),
  /** The record's fields for an upsert (checked by the entity's own schema); ignored for a delete. */
  payload: z.record(z.string(), z.unknown()).nullable(),
  /** ISO time on the device when the change was made. */
  recordedAt: z.iso.datetime({ offset: true }),
  /** The user who made it on the device (informational: the server acts as the signed-in user). */
  recordedBy: uuidSchema.nullable().optional(),
});
export type Mutation = z.infer<typeof mutationSchema>;

export const pushBodySchema = z
  .strictObject({
    deviceId: deviceIdSchema,
    mutations: z.array(mutationSchema).max(MAX_PUSH_BATCH, `At most ${MAX_PUSH_BATCH} mutations a batch.`),
  })
  .superRefine((b, ctx) => {
    // A batch is one run of consecutive seqs, so "every mutation of the batch or none" has one meaning.
    for (let i = 1; i < b.mutations.length; i++) {
      if (b.mutations[i]!.seq !== b.mutations[i - 1]!.seq + 1) {
        ctx.addIssue({ code: 'custom', path: ['mutations', i, 'seq'], message: 'Seqs of a batch must be consecutive and increasing.' });
        return;
      }
    }
    const ids = new Set(b.mutations.map((m) => m.mutationId));
    if (ids.size !== b.mutations.length) ctx.addIssue({ code: 'custom', path: ['mutations'], message: 'A mutationId appears twice.' });
  });
export type PushBody = z.infer<typeof pushBodySchema>;

export const pullQuerySchema = z.object({
  /** The changeSeq of the last change the device saved; 0 (or absent) from the start. */
  cursor: z.coerce.number().int().min(0).default(0),
  limit: z.coerce.number().int().min(1).max(MAX_PULL_LIMIT).default(DEFAULT_PULL_LIMIT),
});
export type PullQuery = z.infer<typeof pullQuerySchema>;

export const deviceRegisterSchema = z.strictObject({
  id: deviceIdSchema,
  label: z.string().trim().min(1).max(80)
    // eslint-disable-next-line no-control-regex
    .refine((s) => !/[\u0000-\u001f\u007f\u202a-\u202e\u2066-\u2069]/.test(s), 'Contains control characters.'),
});
export type DeviceRegisterInput = z.infer<typeof deviceRegisterSchema>;

export const SETTLEMENTS = ['keep_current', 'keep_incoming', 'sum', 'corrected'] as const;
export type Settlement = (typeof SETTLEMENTS)[number];

const count = z.number().int().min(0).max(1_000_000_000);

export const settleConflictSchema = z
  .strictObject({
    settlement: z.enum(SETTLEMENTS),
    /** Why: required, kept with the new version and in the ledger. */
    reason: z.string().trim().min(3, 'Say why (at least 3 characters).').max(500),
    /** The conflict's version as shown on the desk: a settlement by someone else since is a 409. */
    conflictVersion: z.number().int().min(1),
    /** The tally version as shown on the desk (null when it was deleted): a change since is a 409. */
    currentVersion: z.number().int().min(1).nullable(),
    /** For `corrected`: the typed values, people per day. */
    corrected: z
      .strictObject({
        newCases: count,
        recoveries: count.nullable().optional(),
        deaths: count.nullable().optional(),
        admissions: count.nullable().optional(),
      })
      .optional(),
  })
  .superRefine((v, ctx) => {
    if (v.settlement === 'corrected' && !v.corrected) ctx.addIssue({ code: 'custom', path: ['corrected', 'newCases'], message: 'Type the corrected count.' });
  });
export type SettleConflictInput = z.infer<typeof settleConflictSchema>;

export const conflictListQuerySchema = z.object({
  outbreak: uuidSchema,
  status: z.enum(['open', 'settled', 'all']).default('open'),
});

export const ledgerQuerySchema = z.object({
  user: uuidSchema.optional(),
  device: z.string().max(64).optional(),
  outbreak: uuidSchema.optional(),
  kind: z.string().max(32).optional(),
  /** `YYYY-MM-DD`, inclusive (whole days, UTC). */
  from: z.string().regex(/^\d{4}-\d{2}-\d{2}$/).optional(),
  to: z.string().regex(/^\d{4}-\d{2}-\d{2}$/).optional(),
  limit: z.coerce.number().int().min(1).max(5000).optional(),
  offset: z.coerce.number().int().min(0).optional(),
});
export type LedgerQuery = z.infer<typeof ledgerQuerySchema>;
