import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { listReductions, reductionParamsSchema, startReduction } from "@/lib/reductions/reductions";

export const dynamic = "force-dynamic";

// Access is decided per set in lib/reductions: the owner, or a curator.
export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => ({ reductions: await listReductions(getDb(), actor, params.id) }));

export const POST = route({ access: SIGNED_IN, body: reductionParamsSchema }, async ({ actor, params, body }) => {
  const reduction = await startReduction(getDb(), actor, params.id, body);
  return Response.json(reduction, { status: 202 });
});
