import { AppError, forbidden } from '@/lib/http/errors';
import type { Actor } from './actor';
import { roleMay, type Action } from './roles';

/**
 * What a check is about. `outbreakId` alone: an outbreak-level action (coordinators, supervisors,
 * and field officers of a team in it). With `teamId` (the team owning a site): field officers must
 * belong to that team; coordinators and supervisors need only the outbreak.
 */
export interface Scope {
  outbreakId?: string;
  /** The team owning the site in question; `null` for an unassigned site. */
  teamId?: string | null;
}

/** True when the actor's role allows `action` on `scope`. */
export function may(actor: Actor, action: Action, scope: Scope = {}): boolean {
  if (!roleMay(actor.role, action)) return false;
  if (actor.role === 'admin') return true; // installation-wide, but only the admin's own actions
  if (scope.outbreakId !== undefined && !actor.outbreakIds.includes(scope.outbreakId)) return false;
  if (actor.role === 'field' && scope.teamId !== undefined) {
    return scope.teamId !== null && actor.teamIds.includes(scope.teamId);
  }
  return true;
}

/** The one permission check: every route handler and server action calls it. Throws 401/403. */
export function authorize(actor: Actor | null, action: Action, scope: Scope = {}): asserts actor is Actor {
  if (!actor) throw new AppError('unauthenticated', 'Please sign in to continue.');
  if (!may(actor, action, scope)) throw forbidden(describe(action));
}

function describe(action: Action): string {
  const [thing, verb] = action.split(':');
  return `${verb === 'read' ? 'reading' : verb} ${thing}s here`.replace('ss here', 's here');
}
