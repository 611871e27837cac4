import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { assignSchema, assignToMe } from "@/lib/review/queue";

export const dynamic = "force-dynamic";

// The queue's bulk action: take the chosen sets in hand, or hand them back.
export const POST = route({ access: permission("review:use"), body: assignSchema }, async ({ actor, body }) => assignToMe(getDb(), actor, body));
