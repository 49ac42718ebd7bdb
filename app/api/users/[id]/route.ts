import { route } from '@/lib/http/handler';
import { authorize } from '@/lib/auth/permissions';
import { updateUser } from '@/lib/db/users';
import { userUpdateSchema } from '@/lib/validation/user';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const PATCH = route({ body: userUpdateSchema }, async ({ actor, body, params }) => {
  authorize(actor, 'user:manage');
  return { user: await updateUser(params.id!, body) };
});
