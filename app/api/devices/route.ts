import { route } from '@/lib/http/handler';
import { listDevices, registerDevice } from '@/lib/db/sync';
import { deviceRegisterSchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor }) => ({ devices: await listDevices(actor) }));

/** Registers this installation for the signed-in user (idempotent; renames it when the label changed). */
export const POST = route({ body: deviceRegisterSchema }, async ({ actor, body }) => ({ device: await registerDevice(actor, body) }));
