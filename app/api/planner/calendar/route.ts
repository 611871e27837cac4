import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { buildTimelineCalendar } from "@/lib/planner/exports";
import { computeFieldPlan } from "@/lib/planner/plan";
import { plannerQuerySchema, resolvePlan } from "@/lib/planner/resolve";
import { planFileName, planOrInputError } from "@/lib/planner/route-helpers";

export const dynamic = "force-dynamic";

// Public: anyone may plan. A saved site or kit in the query is the caller's own only (resolvePlan checks).
export const GET = route({ access: PUBLIC, query: plannerQuerySchema }, async ({ actor, query }) => {
  const resolved = await resolvePlan(getDb(), actor, query);
  const plan = planOrInputError(() => computeFieldPlan(resolved.input));
  const ics = buildTimelineCalendar(plan, {
    eclipseId: resolved.eclipse.id,
    siteName: resolved.input.site.name,
    latDeg: resolved.input.site.latDeg,
    lonDeg: resolved.input.site.lonDeg,
  });
  return new Response(ics, {
    headers: {
      "content-type": "text/calendar; charset=utf-8",
      "content-disposition": `attachment; filename="${planFileName(resolved, "ics")}"`,
      "cache-control": "no-store",
    },
  });
});
