import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { buildLadderCsv } from "@/lib/planner/exports";
import { computeFieldPlan } from "@/lib/planner/plan";
import { plannerQuerySchema, resolvePlan } from "@/lib/planner/resolve";
import { planFileName, planOrInputError } from "@/lib/planner/route-helpers";

export const dynamic = "force-dynamic";

export const GET = route({ access: PUBLIC, query: plannerQuerySchema }, async ({ actor, query }) => {
  const resolved = await resolvePlan(getDb(), actor, query);
  const plan = planOrInputError(() => computeFieldPlan(resolved.input));
  return new Response(buildLadderCsv(plan), {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${planFileName(resolved, "csv")}"`,
      "cache-control": "no-store",
    },
  });
});
