import { getDb } from "@/db/client";
import { correctFrame, correctFrameSchema, removeFrame } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const PATCH = route({ access: permission("brackets:own"), body: correctFrameSchema }, async ({ actor, params, body }) =>
  correctFrame(getDb(), actor, params.id, params.frameId, body),
);

// Any frame of a set not yet submitted, refused ones included; the owner only.
export const DELETE = route({ access: permission("brackets:own") }, async ({ actor, params }) => removeFrame(getDb(), actor, params.id, params.frameId));
