import { getDb } from "@/db/client";
import { correctFrame, correctFrameSchema, removeRefusedFrame } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const PATCH = route({ access: permission("brackets:own"), body: correctFrameSchema }, async ({ actor, params, body }) =>
  correctFrame(getDb(), actor, params.id, params.frameId, body),
);

// Only a refused frame can be removed (its bytes may then be sent again); 204 when done.
export const DELETE = route({ access: permission("brackets:own") }, async ({ actor, params }) => {
  await removeRefusedFrame(getDb(), actor, params.id, params.frameId);
  return new Response(null, { status: 204 });
});
