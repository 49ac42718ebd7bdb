import type { Role } from './roles';

/** The signed-in person as every server check sees them, re-read from the database per request. */
export interface Actor {
  id: string;
  email: string;
  name: string;
  role: Role;
  /** Teams the user belongs to (field officers record these teams' sites). */
  teamIds: string[];
  /** Outbreaks in the user's scope: by responsibility (coordinator, supervisor) or through a team. */
  outbreakIds: string[];
}
