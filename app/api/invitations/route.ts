import { route } from '@/lib/http/handler';
import { listPendingInvitations, sendInvitation } from '@/lib/db/invitations';
import { invitationInputSchema } from '@/lib/validation/mail';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Open invitations in the actor's scope. */
export const GET = route({}, async ({ actor }) => ({ invitations: await listPendingInvitations(actor) }));

/** Invites a person by e-mail (admins: anyone; coordinators: into their outbreaks, never an admin). */
export const POST = route({ body: invitationInputSchema }, async ({ actor, body }) => ({ invitation: await sendInvitation(actor, body) }));
