import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { publishPlate } from "@/lib/plates/desk";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("review:use") }, async ({ actor, params }) => {
  await publishPlate(getDb(), actor, params.id);
  return { ok: true };
});
