import "server-only";
import { headers } from "next/headers";
import { forbidden, redirect } from "next/navigation";
import { findActor, type Actor } from "@/lib/auth/actor";
import { can, type Action } from "@/lib/auth/permissions";

/** The signed-in person for this request, or null. */
export async function currentActor(): Promise<Actor | null> {
  return findActor(await headers());
}

/**
 * For pages: a visitor without a session goes to sign-in and comes back; a
 * signed-in person without the permission gets the 403 page.
 */
export async function requirePagePermission(action: Action, returnTo: string): Promise<Actor> {
  const actor = await currentActor();
  if (!actor) redirect(`/sign-in?next=${encodeURIComponent(returnTo)}`);
  if (!can(actor.roles, action)) forbidden();
  return actor;
}
