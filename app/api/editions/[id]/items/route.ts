import { getDb } from "@/db/client";
import { addEditionItem } from "@/lib/editions/editions";
import { addItemSchema } from "@/lib/editions/input";
import { json, permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

/** Adds a published plate; alsoIn lists the other editions that already hold it (a warning, not a refusal). */
export const POST = route({ access: permission("editions:use"), body: addItemSchema }, async ({ actor, params, body }) => json(await addEditionItem(getDb(), actor, params.id, body), { status: 201 }));
