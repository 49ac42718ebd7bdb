import { route } from '@/lib/http/handler';
import { authorize } from '@/lib/auth/permissions';
import { createUser, listUsers } from '@/lib/db/users';
import { userCreateSchema } from '@/lib/validation/user';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor }) => {
  authorize(actor, 'user:manage');
  return { users: await listUsers() };
});

export const POST = route({ body: userCreateSchema }, async ({ actor, body }) => {
  authorize(actor, 'user:manage');
  return { user: await createUser(body) };
});
