import { route } from '@/lib/http/handler';
import { acceptInvitation, previewInvitation } from '@/lib/db/invitations';
import { invitationAcceptSchema, tokenQuerySchema } from '@/lib/validation/mail';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

// Public: the invitee has no session yet. Under /api/auth/ with the other sign-in endpoints.

/** What an invitation link is for (address, name, role), or why it no longer works. */
export const GET = route({ public: true, query: tokenQuerySchema }, async ({ query }) => ({ invitation: await previewInvitation(query.token) }));

/** Sets the first password and activates the account; the link is spent. */
export const POST = route({ public: true, body: invitationAcceptSchema }, async ({ body }) => ({ ok: true, ...(await acceptInvitation(body)) }));
