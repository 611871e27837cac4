import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { decide, decisionSchema } from "@/lib/review/decisions";

export const dynamic = "force-dynamic";

// A curator asks for changes, approves, rejects or reopens. Never on their own set.
export const POST = route({ access: permission("review:use"), body: decisionSchema }, async ({ actor, params, body }) => decide(getDb(), actor, params.id, body));
