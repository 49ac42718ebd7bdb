import { route } from '@/lib/http/handler';
import { healthCheck } from '@/lib/db/health';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Liveness and database reachability; answers without sign-in. */
export const GET = route({ public: true }, () => healthCheck());
