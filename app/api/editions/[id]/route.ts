import { getDb } from "@/db/client";
import { deleteEdition, findEdition, setEditionEmbargo } from "@/lib/editions/editions";
import { embargoSchema } from "@/lib/editions/input";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: permission("editions:use") }, async ({ actor, params }) => ({ edition: await findEdition(getDb(), actor, params.id) }));

/** Sets or clears the embargo date. */
export const PATCH = route({ access: permission("editions:use"), body: embargoSchema }, async ({ actor, params, body }) => setEditionEmbargo(getDb(), actor, params.id, body));

/** Deletes a draft edition; an exported one is refused (409). */
export const DELETE = route({ access: permission("editions:use") }, async ({ actor, params }) => {
  await deleteEdition(getDb(), actor, params.id);
  return { ok: true };
});
