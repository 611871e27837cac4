import { getDb } from "@/db/client";
import { createBracketSet, createBracketSetSchema, listBracketSets } from "@/lib/bracket-sets";
import { json, permission, route, SIGNED_IN } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// Members see their own sets, curators every set; the service decides which.
export const GET = route({ access: SIGNED_IN }, async ({ actor }) => ({ bracketSets: await listBracketSets(getDb(), actor) }));

export const POST = route({ access: permission("brackets:own"), body: createBracketSetSchema }, async ({ actor, body }) =>
  json(await createBracketSet(getDb(), actor, body), { status: 201 }),
);
