import path from 'node:path';
import { mkdirSync } from 'node:fs';
import { Sequelize, Transaction } from 'sequelize';
import sqlite3 from 'sqlite3';
import { initModels } from '@/models';
import { migrate } from '@/models/migrations';

/**
 * The one database connection of a server process, cached on globalThis so that Next's module
 * reloading and several route bundles share it.
 *
 * `DATABASE_URL`: `file:relative/or/absolute.sqlite` or a plain path (SQLite, the default
 * `data/ebbcast.sqlite`), or `postgres://…` (same models and migrations; no write lock there).
 */
interface DbState {
  sequelize: Sequelize;
  dialect: 'sqlite' | 'postgres';
  ready: Promise<void>;
  /** Settles when the write queue is empty (SQLite only; closeDb waits for it). */
  idle: Promise<unknown>;
  /** Writes waiting for the lock (SQLite only). */
  queue: WriteJob[];
  draining: boolean;
  stats: WriteStats;
}

/** Counts of the SQLite write queue since the connection opened (tests and benchmarks read them). */
export interface WriteStats {
  /** writeTx calls that ended (committed, refused or failed). */
  writes: number;
  /** Transactions committed or rolled back: fewer than `writes` when group commit joined some. */
  transactions: number;
  /** Groups rolled back whole by an unexpected error and run again one write at a time. */
  regrouped: number;
}

interface WriteJob {
  fn: (t: Transaction) => Promise<unknown>;
  resolve: (value: unknown) => void;
  reject: (error: unknown) => void;
}

const g = globalThis as unknown as { __ebbcastDb?: DbState };

export function databaseUrl(): string {
  return process.env.DATABASE_URL || 'file:data/ebbcast.sqlite';
}

export function sqlitePath(url = databaseUrl()): string | null {
  if (/^postgres(ql)?:\/\//.test(url)) return null;
  const p = url.replace(/^file:/, '');
  return path.isAbsolute(p) ? p : path.join(process.cwd(), p);
}

function open(): DbState {
  const url = databaseUrl();
  const file = sqlitePath(url);
  let sequelize: Sequelize;
  if (file) {
    mkdirSync(path.dirname(file), { recursive: true });
    sequelize = new Sequelize({ dialect: 'sqlite', dialectModule: sqlite3, storage: file, logging: false });
    configureSqliteConnections(sequelize);
  } else {
    sequelize = new Sequelize(url, { dialect: 'postgres', logging: false });
  }
  const state: DbState = {
    sequelize,
    dialect: file ? 'sqlite' : 'postgres',
    ready: Promise.resolve(),
    idle: Promise.resolve(),
    queue: [],
    draining: false,
    stats: { writes: 0, transactions: 0, regrouped: 0 },
  };
  initModels(sequelize);
  initialisedFor = sequelize;
  state.ready = migrate(sequelize);
  return state;
}

const PRAGMAS = 'PRAGMA journal_mode=WAL; PRAGMA synchronous=FULL; PRAGMA foreign_keys=ON; PRAGMA busy_timeout=8000;';

/** The key of the one connection every write transaction runs on (SQLite). */
const WRITER = 'writer';

/**
 * Queries outside a transaction (the reads) take turns on this many connections. Sequelize runs
 * them all on one, and one SQLite connection runs one statement at a time: concurrent requests
 * queued behind each other's SELECTs while sqlite3's other worker threads stood idle. In WAL mode
 * readers do not block each other or the writer. Three readers and the writer fit sqlite3's share
 * of libuv's default four threads. EBBCAST_SQLITE_READERS overrides (1 restores one connection).
 */
const READERS = Math.max(1, Math.min(8, Number(process.env.EBBCAST_SQLITE_READERS) || 3));

/**
 * Sequelize opens a new sqlite3 connection for every transaction, and closes it after; it runs no
 * connect hooks for SQLite; and it runs every other query on one connection (READERS above).
 * Writes are serialised here (writeTx), so every transaction runs on one kept writer connection
 * instead (opening a connection, its pragmas and the schema parse cost
 * more than a small push). The settings a connection needs (WAL, full fsync, foreign keys, busy
 * timeout) are applied once per new connection, before its first query.
 */
function configureSqliteConnections(sequelize: Sequelize) {
  type Cm = {
    getConnection: (o?: { uuid?: string }) => Promise<sqlite3.Database>;
    releaseConnection: (c: sqlite3.Database, force?: boolean) => void;
    destroyConnection: (c: sqlite3.Database) => Promise<void>;
    connections: Record<string, sqlite3.Database>;
  };
  const cm = sequelize.connectionManager as unknown as Cm;
  const original = cm.getConnection.bind(cm);
  const release = cm.releaseConnection.bind(cm);
  const configured = new WeakSet<sqlite3.Database>();
  let turn = 0;
  cm.getConnection = async (options) => {
    const transaction = Boolean(options?.uuid && options.uuid !== 'default');
    const key = transaction ? WRITER : READERS === 1 ? 'default' : `reader-${turn++ % READERS}`;
    const conn = await original({ ...options, uuid: key });
    if (!configured.has(conn)) {
      configured.add(conn);
      await new Promise<void>((resolve, reject) => conn.exec(PRAGMAS, (err) => (err ? reject(err) : resolve())));
    }
    return conn;
  };
  // The writer stays open when its transaction ends; closeDb() closes it with the others.
  cm.releaseConnection = (conn, force) => {
    if (conn !== cm.connections[WRITER]) release(conn, force);
  };
  // After a failed COMMIT or ROLLBACK Sequelize destroys the connection ("undetermined state"):
  // close the writer, which rolls back whatever it still holds, so the next write opens a fresh one.
  const destroy = cm.destroyConnection.bind(cm);
  cm.destroyConnection = async (conn) => {
    if (conn !== cm.connections[WRITER]) return destroy(conn);
    delete cm.connections[WRITER];
    await new Promise<void>((resolve) => conn.close(() => resolve()));
  };
}

/**
 * Next bundles the server code more than once (instrumentation, each route), so one process can
 * hold several copies of the model classes. The connection is shared through globalThis; each
 * copy of this module binds its own model classes to it once.
 */
let initialisedFor: Sequelize | null = null;

function state(): DbState {
  if (!g.__ebbcastDb) g.__ebbcastDb = open();
  const s = g.__ebbcastDb;
  if (initialisedFor !== s.sequelize) {
    initModels(s.sequelize);
    initialisedFor = s.sequelize;
  }
  return s;
}

/** The connection, migrated. Every data function awaits this before its first query. */
export async function db(): Promise<Sequelize> {
  const s = state();
  await s.ready;
  return s.sequelize;
}

/** A copy of the write-queue counts (SQLite; zeros on PostgreSQL, which has no queue). */
export function writeStats(): WriteStats {
  return { ...state().stats };
}

export function dialect(): 'sqlite' | 'postgres' {
  return state().dialect;
}

/**
 * Runs `fn` in a write transaction. On SQLite, writes are serialised by an in-process queue and
 * the transaction is IMMEDIATE: concurrent DEFERRED transactions through Sequelize + sqlite3 fail
 * with SQLITE_BUSY (SYNC.md, measured). On PostgreSQL an advisory lock orders write transactions
 * across every app server (see below). A multi-process SQLite deployment is not supported: the
 * SQLite lock is per process (see DEVELOPERS.md).
 *
 * Group commit (SQLite): the writes that queued while one transaction ran go together into the
 * next transaction, each in a savepoint of its own, and share its one commit (one fsync of the
 * WAL instead of one each, with `synchronous=FULL`). Each write is still all or nothing: a write
 * that throws an expected refusal (isRefusal) is rolled back to its savepoint and only its
 * caller sees the error; no caller is answered before the commit. Any other error (a storage
 * fault, a bug) rolls back the whole group, and its writes run again one transaction each, as
 * if they had never been grouped, so one bad write cannot take the others' commit with it.
 */
export async function writeTx<T>(fn: (t: Transaction) => Promise<T>): Promise<T> {
  const sequelize = await db();
  const s = state();
  if (s.dialect !== 'sqlite') {
    // PostgreSQL, maybe several app servers: write transactions take one advisory lock first, held
    // to their end, so they commit in one order. The ledger's hash chain needs that (each row names
    // the previous one; concurrent appends forked it, tests/integration/ledger-concurrency.test.ts),
    // and taking it before any row lock cannot deadlock. Reads never wait for it.
    return sequelize.transaction(async (t) => {
      await sequelize.query('SELECT pg_advisory_xact_lock(:key)', { transaction: t, replacements: { key: PG_WRITE_LOCK } });
      return fn(t);
    });
  }
  return new Promise<T>((resolve, reject) => {
    s.queue.push({ fn: fn as (t: Transaction) => Promise<unknown>, resolve: resolve as (v: unknown) => void, reject });
    if (!s.draining) s.idle = drain(s);
  });
}

/**
 * An expected refusal of one write: an AppError below 500, bad input found by the numerical core,
 * or a unique or foreign-key violation (one statement refused; SQLite keeps the transaction, and
 * callers such as the capacity alert use a unique key as a claim). The write is rolled back to its
 * savepoint and the group goes on. Checked by name, since Next may bundle more than one copy of
 * the error classes.
 */
const REFUSALS = new Set(['ModelError', 'SequelizeUniqueConstraintError', 'SequelizeForeignKeyConstraintError']);
function isRefusal(err: unknown): boolean {
  const e = err as { name?: unknown; status?: unknown } | null;
  if (!e) return false;
  if (e.name === 'AppError') return typeof e.status === 'number' && e.status < 500;
  return typeof e.name === 'string' && REFUSALS.has(e.name);
}

/** The advisory lock key of write transactions on PostgreSQL ("ebbc"). */
const PG_WRITE_LOCK = 0x65626263;

/** Most writes one commit carries; more wait for the next one. */
const MAX_GROUP = 64;

async function drain(s: DbState) {
  s.draining = true;
  try {
    while (s.queue.length) {
      const group = s.queue.splice(0, MAX_GROUP);
      await (group.length === 1 ? alone(s, group[0]!) : together(s, group));
    }
  } finally {
    s.draining = false;
  }
}

const immediate = (s: DbState, fn: (t: Transaction) => Promise<unknown>) =>
  s.sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, fn);

async function alone(s: DbState, job: WriteJob) {
  s.stats.transactions++;
  s.stats.writes++;
  try {
    job.resolve(await immediate(s, job.fn));
  } catch (err) {
    job.reject(err);
  }
}

async function together(s: DbState, group: WriteJob[]) {
  const outcomes: Array<{ ok: true; value: unknown } | { ok: false; error: unknown }> = [];
  try {
    await immediate(s, async (t) => {
      for (const job of group) {
        try {
          outcomes.push({ ok: true, value: await s.sequelize.transaction({ transaction: t }, job.fn) });
        } catch (error) {
          if (!isRefusal(error)) throw error;
          outcomes.push({ ok: false, error });
        }
      }
    });
  } catch {
    // Nothing of the group was kept: each write gets a transaction of its own, one after another.
    s.stats.transactions++;
    s.stats.regrouped++;
    for (const job of group) await alone(s, job);
    return;
  }
  s.stats.transactions++;
  s.stats.writes += group.length;
  group.forEach((job, i) => {
    const o = outcomes[i]!;
    if (o.ok) job.resolve(o.value);
    else job.reject(o.error);
  });
}

/** Closes the connection (tests, scripts). The next `db()` opens a new one. */
export async function closeDb(): Promise<void> {
  const s = g.__ebbcastDb;
  g.__ebbcastDb = undefined;
  if (s) {
    await s.ready.catch(() => undefined);
    await s.idle.catch(() => undefined);
    await s.sequelize.close();
  }
}
