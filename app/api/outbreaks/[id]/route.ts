import { route } from '@/lib/http/handler';
import { getOutbreakById } from '@/lib/db/outbreaks';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor, params }) => ({ outbreak: await getOutbreakById(actor, params.id!) }));
