import { getDb } from "@/db/client";
import { frameTimesSchema, giveFrameTimes } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// { method: "csv", fileName, text } | { method: "interval", firstAt, intervalS, scope }: times and exposures for many frames at once.
export const POST = route({ access: permission("brackets:own"), body: frameTimesSchema }, async ({ actor, params, body }) => giveFrameTimes(getDb(), actor, params.id, body));
