import { route } from '@/lib/http/handler';
import { createTeam, listTeamsByOutbreak } from '@/lib/db/outbreaks';
import { teamInputSchema } from '@/lib/validation/outbreak';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor, params }) => ({ teams: await listTeamsByOutbreak(actor, params.id!) }));

export const POST = route({ body: teamInputSchema.omit({ outbreakId: true }) }, async ({ actor, body, params }) => ({
  team: await createTeam(actor, { ...body, outbreakId: params.id! }),
}));
