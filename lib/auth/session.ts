import { getServerSession } from 'next-auth';
import { getToken } from 'next-auth/jwt';
import type { NextRequest } from 'next/server';
import { loadActor } from '@/lib/db/users';
import type { Actor } from './actor';
import { authOptions } from './options';

/**
 * The signed-in actor of a route handler's request, or null. The session token only names the
 * user and their session version; role, teams and activity are re-read from the database here,
 * so a deactivation or a role change takes effect on the very next request.
 */
export async function getActorFromRequest(req: NextRequest): Promise<Actor | null> {
  const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
  if (!token?.sub || token.revoked) return null;
  return loadActor(token.sub, Number(token.sessionVersion ?? 0));
}

/** The same for server components and server actions (next-auth runs the re-check in `jwt`). */
export async function getActor(): Promise<Actor | null> {
  const session = await getServerSession(authOptions);
  const u = session?.user;
  if (!u || session?.revoked) return null;
  return { id: u.id, email: u.email, name: u.name, role: u.role, teamIds: u.teamIds, outbreakIds: u.outbreakIds };
}
