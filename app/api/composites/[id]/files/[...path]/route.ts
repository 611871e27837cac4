import { z } from "zod";
import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { serveOutputFile } from "@/lib/reductions/files/serve";

export const dynamic = "force-dynamic";

const querySchema = z.object({ download: z.enum(["0", "1"], { error: "expected 1 (download) or 0" }).optional() });

// One output of a composite, streamed from S3: visible to its composer, curators and the photographers of its
// inputs (others: 404). Not cached, as a reduction's files are not.
export const GET = route({ access: SIGNED_IN, query: querySchema }, async ({ req, actor, params, query }) =>
  serveOutputFile(getDb(), actor, { kind: "composite", id: params.id }, params.path ?? "", { route: "private", download: query.download === "1", ifNoneMatch: req.headers.get("if-none-match") }),
);
