import { getDb } from "@/db/client";
import { submitBracketSet } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// The owner sends the set to the review desk; curators are mailed. The body carries nothing.
export const POST = route({ access: permission("brackets:own") }, async ({ actor, params }) => submitBracketSet(getDb(), actor, params.id));
