/**
 * The SQLite write queue (lib/db/connection.ts writeTx): writes that queue while one transaction
 * runs share the next commit, each in its own savepoint. Every write must stay all or nothing, and
 * no write may be answered before its commit, whatever the others in its group do.
 */
import { USING_POSTGRES, prepare } from '../helpers/server';
import { beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes, type Transaction } from 'sequelize';

const { db, writeTx, writeStats } = await import('@/lib/db/connection');
const { AppError } = await import('@/lib/http/errors');

async function keys(prefix: string): Promise<string[]> {
  const sequelize = await db();
  const rows = await sequelize.query<{ k: string }>('SELECT k FROM zz_group_probe WHERE k LIKE :p ORDER BY k', { type: QueryTypes.SELECT, replacements: { p: `${prefix}%` } });
  return rows.map((r) => r.k);
}

const insert = async (t: Transaction, k: string) => {
  const sequelize = await db();
  await sequelize.query('INSERT INTO zz_group_probe (k) VALUES (:k)', { transaction: t, replacements: { k } });
};

/** Starts `n` writes at once; `kind(i)` says what write i does after inserting its key. */
function burst(prefix: string, n: number, kind: (i: number) => 'ok' | 'refuse' | 'bug' | 'duplicate') {
  return Promise.allSettled(Array.from({ length: n }, (_, i) => writeTx(async (t) => {
    const k = `${prefix}${String(i).padStart(3, '0')}`;
    await insert(t, k);
    const what = kind(i);
    if (what === 'refuse') throw new AppError('conflict', `write ${i} refused`);
    if (what === 'bug') throw new Error(`write ${i} failed unexpectedly`);
    if (what === 'duplicate') await insert(t, k); // a constraint error from the database itself
    return k;
  })));
}

beforeAll(async () => {
  await prepare();
  const sequelize = await db();
  await sequelize.query('CREATE TABLE IF NOT EXISTS zz_group_probe (k VARCHAR(64) PRIMARY KEY)');
});

describe('the write queue', () => {
  it('commits 60 concurrent writes, every one answered with its own result', async () => {
    const before = writeStats();
    const results = await burst('a', 60, () => 'ok');
    expect(results.every((r) => r.status === 'fulfilled')).toBe(true);
    expect(results.map((r) => (r as PromiseFulfilledResult<string>).value)).toEqual(Array.from({ length: 60 }, (_, i) => `a${String(i).padStart(3, '0')}`));
    expect(await keys('a')).toHaveLength(60);
    const after = writeStats();
    if (!USING_POSTGRES) {
      expect(after.writes - before.writes).toBe(60);
      // The first write runs alone; the 59 that queued meanwhile share at most a few commits.
      expect(after.transactions - before.transactions).toBeLessThan(10);
      console.log(`group commit: 60 writes in ${after.transactions - before.transactions} transactions`);
    }
  });

  it('rolls back a refused write alone: its caller gets the refusal, the others commit', async () => {
    const results = await burst('b', 30, (i) => (i % 3 === 1 ? 'refuse' : 'ok'));
    results.forEach((r, i) => {
      if (i % 3 === 1) {
        expect(r.status).toBe('rejected');
        expect((r as PromiseRejectedResult).reason).toMatchObject({ code: 'conflict', message: `write ${i} refused` });
      } else expect(r.status).toBe('fulfilled');
    });
    const kept = await keys('b');
    expect(kept).toHaveLength(20);
    expect(kept.some((k) => Number(k.slice(1)) % 3 === 1)).toBe(false);
  });

  it.each(['bug', 'duplicate'] as const)('a failure of the database or the code (%s) fails only its own write; the others are applied once', async (kind) => {
    const prefix = kind === 'bug' ? 'c' : 'd';
    const before = writeStats();
    const results = await burst(prefix, 20, (i) => (i === 7 ? kind : 'ok'));
    results.forEach((r, i) => expect(r.status, `write ${i}`).toBe(i === 7 ? 'rejected' : 'fulfilled'));
    if (kind === 'bug') expect((results[7] as PromiseRejectedResult).reason.message).toBe('write 7 failed unexpectedly');
    const kept = await keys(prefix);
    expect(kept).toHaveLength(19);
    expect(kept).not.toContain(`${prefix}007`);
    if (kind === 'duplicate') expect((results[7] as PromiseRejectedResult).reason.name).toBe('SequelizeUniqueConstraintError');
    // A unique violation is refused alone (its savepoint); an unknown error rolls the group back and reruns it.
    if (!USING_POSTGRES) expect(writeStats().regrouped - before.regrouped).toBe(kind === 'bug' ? 1 : 0);
  });

  it('applies a write that queued behind a failed group, once', async () => {
    const first = burst('e', 10, (i) => (i === 3 ? 'bug' : 'ok'));
    const late = writeTx((t) => insert(t, 'e-late'));
    await Promise.allSettled([first, late]);
    expect(await keys('e-late')).toEqual(['e-late']);
    expect(await keys('e0')).toHaveLength(9);
  });
});

describe.skipIf(USING_POSTGRES)('a failed commit', () => {
  it('leaves the next writes working: the writer connection is replaced, not reused half-open', async () => {
    // A deferred foreign-key violation fails at COMMIT, with the transaction still open.
    const badCommit = () => writeTx(async (t) => {
      const sequelize = await db();
      await sequelize.query('PRAGMA defer_foreign_keys = ON', { transaction: t });
      await sequelize.query("INSERT INTO team_memberships (id, team_id, user_id, created_at, updated_at) VALUES ('00000000-0000-4000-8000-00000000dead', '00000000-0000-4000-8000-00000000beef', '00000000-0000-4000-8000-00000000beef', '2026-01-01', '2026-01-01')", { transaction: t });
      await insert(t, 'f-bad');
    });
    await expect(badCommit()).rejects.toThrow(/FOREIGN KEY/i);
    expect(await writeTx((t) => insert(t, 'f-after-alone'))).toBeUndefined();
    // The same inside a group: the group's commit fails, its writes run again alone, the bad one fails alone.
    const results = await Promise.allSettled([badCommit(), ...Array.from({ length: 8 }, (_, i) => writeTx((t) => insert(t, `f-group-${i}`)))]);
    expect(results[0]!.status).toBe('rejected');
    expect(results.slice(1).every((r) => r.status === 'fulfilled')).toBe(true);
    expect(await keys('f-')).toEqual(['f-after-alone', ...Array.from({ length: 8 }, (_, i) => `f-group-${i}`)].sort());
  });
});
