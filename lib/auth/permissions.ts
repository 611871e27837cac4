// The one permission table: each action names the roles that may take it. A
// person's permissions are the union over the roles they hold. Consulted only
// on the server (route handlers, server actions, lib services); the UI may use
// it to hide links, but hiding is never the check.
import type { Role } from "./roles";

export const PERMISSIONS = {
  // Member workspace: own kits, sites, bracket sets, reductions.
  "studio:use": ["member"],
  // Bracket sets: members create, upload to and correct their own.
  "brackets:own": ["member"],
  // Curators: every bracket set and reduction, the review desk.
  "review:use": ["curator"],
  "brackets:read-all": ["curator"],
  // Editors: editions and their exports.
  "editions:use": ["editor", "admin"],
  // Admin: people and roles, society settings, audit log.
  "people:list": ["admin"],
  "roles:grant": ["admin"],
  "settings:edit": ["admin"],
  "audit:read": ["admin"],
  "eclipses:edit": ["admin"],
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof PERMISSIONS;

export const ACTIONS = Object.keys(PERMISSIONS) as Action[];

/** True when any role held allows the action. An empty role list allows nothing. */
export function can(roles: readonly Role[], action: Action): boolean {
  const allowed: readonly Role[] = PERMISSIONS[action];
  if (!allowed) return false;
  return roles.some((r) => allowed.includes(r));
}

/** Every action the roles allow, for navigation and DTOs. */
export function allowedActions(roles: readonly Role[]): Action[] {
  return ACTIONS.filter((a) => can(roles, a));
}
