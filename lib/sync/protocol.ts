/**
 * Types of the sync protocol (SYNC.md), shared by the server (lib/db/sync.ts) and the sync client
 * (lib/sync/engine.ts, lib/offline). Pure: no database, no DOM.
 */
import type { Mutation, SyncEntity } from '@/lib/validation/sync';

export type { Mutation, SyncEntity };

export type Fate = 'applied' | 'duplicate' | 'conflict' | 'rejected';

/** What the server answers for one mutation; stored with it and sent again, unchanged, on a resend. */
export interface PushResult {
  mutationId: string;
  fate: Fate;
  /** Why it was rejected or sent to the merge desk (e.g. forbidden, stale_version). */
  reason?: string;
  /** The server's record after this mutation (for a conflict: the value that stayed). */
  record?: Record<string, unknown> | null;
  conflictId?: string;
}

export interface PushResponse {
  results: PushResult[];
  /** The highest seq the server has recorded from this device. */
  highestSeq: number;
}

/** The table names of synced records, as pull names them. */
export const PULL_ENTITIES = ['outbreak', 'team', 'site', 'tally', 'scenario'] as const;
export type PullEntity = (typeof PULL_ENTITIES)[number];

export interface Change {
  entity: PullEntity;
  /** The record as the API returns it (lib/types/records.ts), tombstones included. */
  record: Record<string, unknown> & { id: string; version: number; changeSeq: number; deletedAt: string | null };
}

export interface PullResponse {
  changes: Change[];
  /** Store this only after the page is saved locally; send it back to get the next page. */
  cursor: number;
  more: boolean;
}

/** The error detail of a refused push whose first seq is not the next one the server expects. */
export interface SeqGapDetail {
  /** seq_gap: mutations are missing before `seq`; seq_reused: `seq` belongs to another mutation already. */
  reason: 'seq_gap' | 'seq_reused';
  expectedSeq: number;
  /** The seq of the first mutation the server could not take. */
  seq: number;
}
