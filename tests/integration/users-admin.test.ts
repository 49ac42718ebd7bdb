/**
 * User management keeps one way back in: the last active administrator cannot be deactivated or
 * given another role (409, nothing changed); with a second administrator both changes go through.
 */
import { call, prepare, sessionCookie } from '../helpers/server';
import { beforeAll, describe, expect, it } from 'vitest';

let admin: string;
let adminId: string;

beforeAll(async () => {
  await prepare();
  admin = await sessionCookie('admin@marrowbend.example');
  const { findUserIdByEmail } = await import('@/lib/db/users');
  adminId = (await findUserIdByEmail('admin@marrowbend.example'))!;
});

describe('the last administrator', () => {
  it('cannot be deactivated or demoted, and stays as they were', async () => {
    const { PATCH } = await import('@/app/api/users/[id]/route');
    for (const body of [{ active: false }, { role: 'coordinator' }]) {
      const res = await call(PATCH as never, `/api/users/${adminId}`, { method: 'PATCH', cookie: admin, params: { id: adminId }, body });
      expect(res.status).toBe(409);
      expect(res.body.error.code).toBe('conflict');
      expect(res.body.error.message).toContain('at least one active administrator');
    }
    const { getUserById } = await import('@/lib/db/users');
    expect(await getUserById(adminId)).toMatchObject({ role: 'admin', active: true });
    // A rename is not a change of role or state.
    const renamed = await call(PATCH as never, `/api/users/${adminId}`, { method: 'PATCH', cookie: admin, params: { id: adminId }, body: { name: 'Priya Nair' } });
    expect(renamed.status).toBe(200);
  });

  it('can step down once another administrator is active', async () => {
    const { createUser, getUserById } = await import('@/lib/db/users');
    const second = await createUser({ email: 'second.admin@marrowbend.example', name: 'Second Admin', role: 'admin', teamIds: [], outbreakIds: [] });
    const { PATCH } = await import('@/app/api/users/[id]/route');
    const res = await call(PATCH as never, `/api/users/${adminId}`, { method: 'PATCH', cookie: admin, params: { id: adminId }, body: { role: 'coordinator' } });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ role: 'coordinator' });
    // Now the second one is the last: refused again.
    const secondCookie = await sessionCookie('second.admin@marrowbend.example');
    const last = await call(PATCH as never, `/api/users/${second.id}`, { method: 'PATCH', cookie: secondCookie, params: { id: second.id }, body: { active: false } });
    expect(last.status).toBe(409);
    expect(await getUserById(second.id)).toMatchObject({ role: 'admin', active: true });
  });
});
