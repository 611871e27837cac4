// What the planner page shows for an address: the query read field by field,
// the plan (or why there is none), the path of totality for the map, and for a
// place outside the path how far it is. A value that cannot be used is named
// beside its field and left out; the rest still plans.
import type { DbOrTx } from "@/db/client";
import type { Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { describePathLines, findCentralPath, findTotalityReach, type PathLines, type TotalityReach } from "./path";
import { computeFieldPlan, isNotVisible, type PlanResult } from "./plan";
import { parsePlannerQuery, resolvePlan, type PlannerFieldProblem, type PlannerQuery, type ResolvedPlan } from "./resolve";

export interface PlannerPageModel {
  query: PlannerQuery;
  fieldProblems: PlannerFieldProblem[];
  /** Why there is no plan, in words (for example: the eclipse is not seen from there). */
  problem: string;
  resolved: ResolvedPlan | null;
  plan: PlanResult | null;
  /** The address's usable values, for the download links and the link to this plan. */
  share: URLSearchParams;
  pathLines: PathLines | null;
  reach: TotalityReach | null;
  /** The planner's address for a place just inside the path. */
  insideHref: string | null;
}

export async function preparePlannerPage(
  db: DbOrTx,
  actor: Actor | null,
  raw: Record<string, string | string[] | undefined>,
  knownEclipseIds: string[],
): Promise<PlannerPageModel> {
  const parsedQuery = parsePlannerQuery(raw);
  let query = parsedQuery.query;
  const fieldProblems: PlannerFieldProblem[] = [...parsedQuery.problems];
  if (query.eclipse && !knownEclipseIds.includes(query.eclipse)) {
    fieldProblems.push({ field: "eclipse", label: "Eclipse", message: `Eclipse: there is no solar eclipse on ${query.eclipse} in the catalogue; choose one from the list.` });
    query = { ...query, eclipse: undefined };
  }
  let problem = "";
  let resolved: ResolvedPlan | null = null;
  let plan: PlanResult | null = null;
  try {
    // A saved site or kit that is not (or no longer) the visitor's own: say so beside it and plan without it.
    for (let attempt = 0; !resolved; attempt++) {
      try {
        resolved = await resolvePlan(db, actor, query);
      } catch (err) {
        const field = err instanceof AppError && err.code === "not_found" ? (query.site && /site/.test(err.message) ? "site" : query.kit && /kit/.test(err.message) ? "kit" : null) : null;
        if (!field || attempt > 1) throw err;
        fieldProblems.push({ field, label: field === "site" ? "One of your sites" : "One of your kits", message: `${field === "site" ? "Site" : "Kit"}: not one of yours here (sign in as its owner, or choose another).` });
        query = { ...query, [field]: undefined };
      }
    }
    plan = computeFieldPlan(resolved.input);
  } catch (err) {
    if (err instanceof AppError || isNotVisible(err)) problem = (err as Error).message;
    else throw err;
  }
  // Only the values that were used go into the links: a refused one would only be refused again.
  const refused = new Set<string>(fieldProblems.map((p) => p.field));
  const share = new URLSearchParams(
    Object.entries(raw).flatMap(([k, v]) => {
      const text = Array.isArray(v) ? v[0] : v;
      return typeof text === "string" && text !== "" && !refused.has(k) ? [[k, text] as [string, string]] : [];
    }),
  );
  const eclipse = resolved?.eclipse ?? null;
  const path = eclipse && eclipse.kind !== "partial" ? findCentralPath(eclipse) : null;
  const pathLines: PathLines | null = path && eclipse && eclipse.kind !== "partial" ? describePathLines(path, eclipse.kind) : null;
  const localKind = plan?.circumstances.kind ?? null;
  let reach: TotalityReach | null = null;
  // Outside the path, and also where the eclipse is not seen at all: how far the path is.
  if ((localKind === "partial" || (!plan && problem)) && path && resolved) reach = findTotalityReach(path, resolved.input.site);
  let insideHref: string | null = null;
  if (reach) {
    const there = new URLSearchParams(share);
    there.delete("site");
    there.delete("place");
    there.set("lat", reach.inside.latDeg.toFixed(3));
    there.set("lon", reach.inside.lonDeg.toFixed(3));
    insideHref = `/planner?${there}`;
  }
  return { query, fieldProblems, problem, resolved, plan, share, pathLines, reach, insideHref };
}
