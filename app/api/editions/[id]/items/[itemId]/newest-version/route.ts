import { getDb } from "@/db/client";
import { pinNewestPlateVersion } from "@/lib/editions/item-version";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

/** Re-pins the item to its plate's newest version; renditionNote says when the rendition had to change. */
export const POST = route({ access: permission("editions:use") }, async ({ actor, params }) => pinNewestPlateVersion(getDb(), actor, params.id, params.itemId));
