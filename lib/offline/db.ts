'use client';
/**
 * The device's database (Dexie over IndexedDB), named `ebbcast`: the records the user may see
 * (filled by pull), the outbox, the shadow copies of records with pending edits, the mutations the
 * server refused, and `meta` (device id, seq, cursor, last sync). Client only.
 *
 * Every read-write transaction commits with strict durability: Chromium's default "relaxed"
 * commit can lose the last writes on power loss (SYNC.md, measured), and the outbox must survive.
 */
import Dexie, { type Table } from 'dexie';
import type { LocalRecord, OutboxEntry, RejectedEntry } from '@/lib/sync/engine';
import type { PushResult } from '@/lib/sync/protocol';

export interface MetaRow {
  key: string;
  value: unknown;
}

export interface ShadowRow {
  id: string;
  entity: string;
  record: LocalRecord;
}

/** The answers of the last sync runs, for the sync page. */
export interface ResultRow {
  mutationId: string;
  at: string;
  entity: string;
  entityId: string;
  op: 'upsert' | 'delete';
  result: PushResult;
}

export class EbbcastDb extends Dexie {
  outbreaks!: Table<LocalRecord, string>;
  teams!: Table<LocalRecord, string>;
  sites!: Table<LocalRecord, string>;
  tallies!: Table<LocalRecord, string>;
  scenarios!: Table<LocalRecord, string>;
  shadow!: Table<ShadowRow, string>;
  outbox!: Table<OutboxEntry, number>;
  meta!: Table<MetaRow, string>;
  rejected!: Table<RejectedEntry, string>;
  results!: Table<ResultRow, string>;

  constructor() {
    super('ebbcast', { chromeTransactionDurability: 'strict' });
    this.version(1).stores({
      outbreaks: 'id, changeSeq',
      teams: 'id, outbreakId',
      sites: 'id, outbreakId, teamId',
      tallies: 'id, outbreakId, siteId, [siteId+date], date',
      scenarios: 'id, outbreakId',
      shadow: 'id',
      outbox: 'seq, entityId, &mutationId',
      meta: 'key',
      rejected: 'mutationId, at',
      results: 'mutationId, at',
    });
  }
}

let instance: EbbcastDb | null = null;

/** The one database of this tab (opened on first use). */
export function localDb(): EbbcastDb {
  instance ??= new EbbcastDb();
  return instance;
}

/** The record tables, by the entity names of the protocol. */
export function tableOf(db: EbbcastDb, entity: string): Table<LocalRecord, string> {
  switch (entity) {
    case 'outbreak': return db.outbreaks;
    case 'team': return db.teams;
    case 'site': return db.sites;
    case 'tally': return db.tallies;
    case 'scenario': return db.scenarios;
    default: throw new Error(`No local table for ${entity}`);
  }
}

/** Asks the browser to keep this origin's storage under pressure (SYNC.md); the answer is only a hint. */
export async function askPersistentStorage(): Promise<boolean> {
  try {
    if (!navigator.storage?.persist) return false;
    if (await navigator.storage.persisted()) return true;
    return await navigator.storage.persist();
  } catch {
    return false;
  }
}
