import { getDb } from "@/db/client";
import { reopenEdition } from "@/lib/editions/export/exports";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

/** An exported edition back to draft; its print bundles stay. */
export const POST = route({ access: permission("editions:use") }, async ({ actor, params }) => reopenEdition(getDb(), actor, params.id));
