import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { compositeRequestSchema, listComposites, startComposite } from "@/lib/composites/composites";

export const dynamic = "force-dynamic";

// Access is decided in lib/composites: members compose their own reductions, curators anyone's.
export const GET = route({ access: SIGNED_IN }, async ({ actor }) => ({ composites: await listComposites(getDb(), actor) }));

export const POST = route({ access: SIGNED_IN, body: compositeRequestSchema }, async ({ actor, body }) => {
  const composite = await startComposite(getDb(), actor, body);
  return Response.json(composite, { status: 202 });
});
