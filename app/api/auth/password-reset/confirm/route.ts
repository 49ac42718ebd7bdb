import { route } from '@/lib/http/handler';
import { checkResetToken, confirmPasswordReset } from '@/lib/db/password-reset';
import { resetConfirmSchema, tokenQuerySchema } from '@/lib/validation/mail';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Whether a reset link still works. */
export const GET = route({ public: true, query: tokenQuerySchema }, async ({ query }) => ({ reset: await checkResetToken(query.token) }));

/** Sets the new password with a reset link; the link is spent and other sessions end. */
export const POST = route({ public: true, body: resetConfirmSchema }, async ({ body }) => ({ ok: true, ...(await confirmPasswordReset(body)) }));
