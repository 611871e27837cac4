import { getDb } from "@/db/client";
import { renameEdition } from "@/lib/editions/editions";
import { editionNameSchema } from "@/lib/editions/input";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

/** Title, kind and issue label; allowed after export too, since it only names the edition. */
export const PATCH = route({ access: permission("editions:use"), body: editionNameSchema }, async ({ actor, params, body }) => renameEdition(getDb(), actor, params.id, body));
