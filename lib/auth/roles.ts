/**
 * Roles and the one permission table (PRODUCT.md, "People and roles"). This file has no server-only
 * imports, so the client can use it to lay out navigation; the server enforces it in ./permissions.
 */
export const ROLES = ['field', 'coordinator', 'supervisor', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ACTIONS = [
  'outbreak:read',
  'outbreak:manage',
  'site:manage',
  'team:manage',
  'tally:read',
  'tally:write',
  'tally:import',
  'scenario:read',
  'scenario:write',
  'run:compute',
  'forecast:publish',
  'sync:push',
  'sync:pull',
  'merge:settle',
  'ledger:read',
  'ledger:export',
  'sitrep:read',
  'sitrep:send',
  'upload:write',
  'upload:read',
  'user:manage',
  'invite:send',
  'mail:read',
] as const;
export type Action = (typeof ACTIONS)[number];

const FIELD: Action[] = [
  'outbreak:read', 'tally:read', 'tally:write', 'scenario:read', 'scenario:write', 'run:compute',
  'sync:push', 'sync:pull', 'sitrep:read', 'upload:write', 'upload:read',
];

/** Who may do what. Scope (which outbreak, which team) is checked separately, in `authorize`. */
export const PERMISSIONS: Record<Role, ReadonlySet<Action>> = {
  field: new Set(FIELD),
  coordinator: new Set<Action>([
    ...FIELD, 'tally:import', 'outbreak:manage', 'site:manage', 'team:manage', 'forecast:publish',
    'merge:settle', 'sitrep:send', 'invite:send', 'ledger:read',
  ]),
  supervisor: new Set<Action>([
    'outbreak:read', 'tally:read', 'scenario:read', 'run:compute', 'sync:pull', 'ledger:read',
    'ledger:export', 'sitrep:read', 'upload:read',
  ]),
  admin: new Set<Action>(['outbreak:read', 'user:manage', 'invite:send', 'mail:read', 'run:compute', 'ledger:read']),
};

export function roleMay(role: Role, action: Action): boolean {
  return PERMISSIONS[role]?.has(action) ?? false;
}

export const ROLE_LABEL: Record<Role, string> = {
  field: 'Field officer',
  coordinator: 'Coordinator',
  supervisor: 'Supervisor',
  admin: 'Administrator',
};
