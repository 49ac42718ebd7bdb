import { route } from '@/lib/http/handler';
import { createOutbreak, listOutbreaksForActor } from '@/lib/db/outbreaks';
import { outbreakInputSchema } from '@/lib/validation/outbreak';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor }) => ({ outbreaks: await listOutbreaksForActor(actor) }));

export const POST = route({ body: outbreakInputSchema }, async ({ actor, body }) => ({ outbreak: await createOutbreak(actor, body) }));
