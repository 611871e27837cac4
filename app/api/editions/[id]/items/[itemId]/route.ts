import { getDb } from "@/db/client";
import { removeEditionItem, updateEditionItem } from "@/lib/editions/editions";
import { updateItemSchema } from "@/lib/editions/input";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const PATCH = route({ access: permission("editions:use"), body: updateItemSchema }, async ({ actor, params, body }) => {
  await updateEditionItem(getDb(), actor, params.id, params.itemId, body);
  return { ok: true };
});

export const DELETE = route({ access: permission("editions:use") }, async ({ actor, params }) => {
  await removeEditionItem(getDb(), actor, params.id, params.itemId);
  return { ok: true };
});
