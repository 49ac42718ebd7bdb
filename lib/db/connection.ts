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
  /** Tail of the in-process write queue (SQLite only). */
  lockTail: Promise<unknown>;
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
    lockTail: Promise.resolve(),
  };
  initModels(sequelize);
  initialisedFor = sequelize;
  state.ready = migrate(sequelize);
  return state;
}

const PRAGMAS = 'PRAGMA journal_mode=WAL; PRAGMA synchronous=FULL; PRAGMA foreign_keys=ON; PRAGMA busy_timeout=8000;';

/**
 * Sequelize opens one sqlite3 connection per transaction and runs no connect hooks for SQLite, so
 * the settings a connection needs (WAL, full fsync, foreign keys, busy timeout) are applied here,
 * once per new connection, before its first query.
 */
function configureSqliteConnections(sequelize: Sequelize) {
  const cm = sequelize.connectionManager as unknown as { getConnection: (o?: unknown) => Promise<sqlite3.Database> };
  const original = cm.getConnection.bind(cm);
  const configured = new WeakSet<sqlite3.Database>();
  cm.getConnection = async (options?: unknown) => {
    const conn = await original(options);
    if (!configured.has(conn)) {
      configured.add(conn);
      await new Promise<void>((resolve, reject) => conn.exec(PRAGMAS, (err) => (err ? reject(err) : resolve())));
    }
    return conn;
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

export function dialect(): 'sqlite' | 'postgres' {
  return state().dialect;
}

/**
 * Runs `fn` in a write transaction. On SQLite, writes are serialised by an in-process queue and
 * the transaction is IMMEDIATE: concurrent DEFERRED transactions through Sequelize + sqlite3 fail
 * with SQLITE_BUSY (SYNC.md, measured). On PostgreSQL the database's own transactions suffice.
 * A multi-process SQLite deployment is not supported: the lock is per process (see DEVELOPERS.md).
 */
export async function writeTx<T>(fn: (t: Transaction) => Promise<T>): Promise<T> {
  const sequelize = await db();
  const s = state();
  if (s.dialect !== 'sqlite') return sequelize.transaction(fn);
  const run = () => sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, fn);
  const result = s.lockTail.then(run, run);
  s.lockTail = result.catch(() => undefined);
  return result;
}

/** Closes the connection (tests, scripts). The next `db()` opens a new one. */
export async function closeDb(): Promise<void> {
  const s = g.__ebbcastDb;
  g.__ebbcastDb = undefined;
  if (s) {
    await s.ready.catch(() => undefined);
    await s.lockTail.catch(() => undefined);
    await s.sequelize.close();
  }
}
