import { getDb } from "@/db/client";
import { moveEditionItem } from "@/lib/editions/editions";
import { moveItemSchema } from "@/lib/editions/input";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("editions:use"), body: moveItemSchema }, async ({ actor, params, body }) => moveEditionItem(getDb(), actor, params.id, params.itemId, body));
