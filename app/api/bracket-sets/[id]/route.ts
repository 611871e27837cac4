import { getDb } from "@/db/client";
import { clockOffsetSchema, findBracketSet, setClockOffset } from "@/lib/bracket-sets";
import { permission, route, SIGNED_IN } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => findBracketSet(getDb(), actor, params.id));

export const PATCH = route({ access: permission("brackets:own"), body: clockOffsetSchema }, async ({ actor, params, body }) =>
  setClockOffset(getDb(), actor, params.id, body.clockOffsetS),
);
