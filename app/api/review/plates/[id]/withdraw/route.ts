import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { withdrawPlate } from "@/lib/plates/desk";
import { withdrawSchema } from "@/lib/plates/desk-input";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("review:use"), body: withdrawSchema }, async ({ actor, params, body }) => {
  await withdrawPlate(getDb(), actor, params.id, body);
  return { ok: true };
});
