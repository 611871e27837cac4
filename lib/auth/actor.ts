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

export function requirePermission(actor: Actor | null, action: Action, what?: string): Actor {
  const a = requireSignedIn(actor);
  if (!can(a.roles, action)) throw forbidden(what ?? action);
  return a;
}

export function isAppError(err: unknown): err is AppError {
  return err instanceof AppError;
}
