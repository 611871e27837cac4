import { getDb } from "@/db/client";
import { findEdition, setEditionEmbargo } from "@/lib/editions/editions";
import { embargoSchema } from "@/lib/editions/input";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: permission("editions:use") }, async ({ actor, params }) => ({ edition: await findEdition(getDb(), actor, params.id) }));

/** Sets or clears the embargo date. */
export const PATCH = route({ access: permission("editions:use"), body: embargoSchema }, async ({ actor, params, body }) => setEditionEmbargo(getDb(), actor, params.id, body));
