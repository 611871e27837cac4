import { getDb } from "@/db/client";
import { correctFrame, correctFrameSchema } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const PATCH = route({ access: permission("brackets:own"), body: correctFrameSchema }, async ({ actor, params, body }) =>
  correctFrame(getDb(), actor, params.id, params.frameId, body),
);
