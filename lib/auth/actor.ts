// The actor: who is asking, with the roles they hold, decided on the server
// from the session cookie. Domain functions take it explicitly.
import { getDb } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { AppError, forbidden, unauthenticated } from "@/lib/errors";
import { getAuth } from "./auth";
import { can, type Action } from "./permissions";
import type { Role } from "./roles";

export interface Actor {
  userId: string;
  email: string;
  name: string;
  roles: Role[];
}

export async function findActor(headers: Headers): Promise<Actor | null> {
  const session = await getAuth().api.getSession({ headers });
  if (!session) return null;
  const roles = await findRolesOfUser(getDb(), session.user.id);
  return { userId: session.user.id, email: session.user.email, name: session.user.name, roles };
}

export function requireSignedIn(actor: Actor | null): Actor {
  if (!actor) throw unauthenticated();
  return actor;
}

/** What each action allows, in words, for refusals that name no particular thing. */
const ACTION_WORDS: Record<Action, string> = {
  "studio:use": "using the studio",
  "brackets:own": "keeping bracket sets",
  "review:use": "using the review desk",
  "brackets:read-all": "reading other members' bracket sets",
  "editions:use": "working on editions",
  "people:list": "seeing the list of people",
  "roles:grant": "changing people's roles",
  "settings:edit": "changing the society's settings",
  "audit:read": "reading the audit log",
  "eclipses:edit": "editing the eclipse catalogue",
};

export function requirePermission(actor: Actor | null, action: Action, what?: string): Actor {
  const a = requireSignedIn(actor);
  // The refusal names what was refused in words, never the action's code.
  if (!can(a.roles, action)) throw forbidden(what ?? ACTION_WORDS[action]);
  return a;
}

export function isAppError(err: unknown): err is AppError {
  return err instanceof AppError;
}
