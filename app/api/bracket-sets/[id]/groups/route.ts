import { getDb } from "@/db/client";
import { changeGroups, groupActionSchema } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// { action: "split", frameId } | { action: "merge", groupNumber } | { action: "auto", gapS? }; answers the whole set.
export const POST = route({ access: permission("brackets:own"), body: groupActionSchema }, async ({ actor, params, body }) =>
  changeGroups(getDb(), actor, params.id, body),
);
