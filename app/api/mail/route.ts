import { route } from '@/lib/http/handler';
import { authorize } from '@/lib/auth/permissions';
import { listCaughtMail, usingCatcher } from '@/lib/mail/mailbox';
import { mailListQuerySchema } from '@/lib/validation/mail';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Messages kept by the local mail catcher, newest first (admins). */
export const GET = route({ query: mailListQuerySchema }, async ({ actor, query }) => {
  authorize(actor, 'mail:read');
  return { catcher: usingCatcher(), messages: listCaughtMail({ to: query.to, limit: query.limit }) };
});
