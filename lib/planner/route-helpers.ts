import { AstroError } from "@/lib/astro/errors";
import { AppError } from "@/lib/errors";
import type { PlanResult } from "./plan";
import type { ResolvedPlan } from "./resolve";

/** A site that sees no eclipse is the caller's input problem, not a server fault. */
export function planOrInputError(compute: () => PlanResult): PlanResult {
  try {
    return compute();
  } catch (err) {
    if (err instanceof AstroError) throw new AppError("invalid_input", err.message, [{ field: err.field ?? "site", message: err.message }]);
    throw err;
  }
}

/** A file name with only safe characters: eclipse-2027-08-02-luxor.ics */
export function planFileName(resolved: ResolvedPlan, ext: string): string {
  const place = resolved.input.site.name
    .normalize("NFKD")
    .replace(/[^\w]+/g, "-")
    .replace(/^-|-$/g, "")
    .toLowerCase()
    .slice(0, 40);
  return `eclipse-${resolved.eclipse.id}${place ? `-${place}` : ""}.${ext}`;
}
