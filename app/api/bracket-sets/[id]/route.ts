import { getDb } from "@/db/client";
import { findBracketSet, updateBracketSet, updateBracketSetSchema } from "@/lib/bracket-sets";
import { permission, route, SIGNED_IN } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => findBracketSet(getDb(), actor, params.id));

// The camera clock's offset: { clockOffsetS } typed, or { clockFrameId, clockShownAt } from a frame showing a trusted clock.
export const PATCH = route({ access: permission("brackets:own"), body: updateBracketSetSchema }, async ({ actor, params, body }) =>
  updateBracketSet(getDb(), actor, params.id, body),
);
