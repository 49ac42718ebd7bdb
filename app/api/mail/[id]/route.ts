import { route } from '@/lib/http/handler';
import { authorize } from '@/lib/auth/permissions';
import { getCaughtMail } from '@/lib/mail/mailbox';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** One caught message with its text and HTML parts (admins). */
export const GET = route({}, async ({ actor, params }) => {
  authorize(actor, 'mail:read');
  return { message: getCaughtMail(params.id!) };
});
