import { route } from '@/lib/http/handler';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The signed-in actor: id, name, role, teams and outbreaks in scope. */
export const GET = route({}, async ({ actor }) => ({ user: actor }));
