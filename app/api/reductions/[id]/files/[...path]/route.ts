import { z } from "zod";
import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { serveOutputFile } from "@/lib/reductions/files/serve";

export const dynamic = "force-dynamic";

const querySchema = z.object({ download: z.enum(["0", "1"], { error: "expected 1 (download) or 0" }).optional() });

// One output of a reduction, streamed from S3. Visible to the set's owner and
// curators only (others: 404), with the exact site in master.fits and report.json:
// no cache keeps them ("private, no-store"), so a shared computer does not either.
export const GET = route({ access: SIGNED_IN, query: querySchema }, async ({ req, actor, params, query }) =>
  serveOutputFile(getDb(), actor, { kind: "reduction", id: params.id }, params.path ?? "", { route: "private", download: query.download === "1", ifNoneMatch: req.headers.get("if-none-match") }),
);
