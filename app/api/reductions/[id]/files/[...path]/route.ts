import { z } from "zod";
import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { openReductionOutput } from "@/lib/reductions/outputs";
import { PRIVATE_NO_STORE } from "@/lib/http/cache";

export const dynamic = "force-dynamic";

const querySchema = z.object({ download: z.enum(["0", "1"], { error: "expected 1 (download) or 0" }).optional() });

// One output of a reduction, streamed from S3. Visible to the set's owner and
// curators only (others: 404), with the exact site in master.fits and report.json:
// no cache keeps them ("private, no-store"), so a shared computer does not either.
export const GET = route({ access: SIGNED_IN, query: querySchema }, async ({ actor, params, query }) => {
  const file = await openReductionOutput(getDb(), actor, params.id, params.path ?? "");
  const headers = new Headers({
    "content-type": file.contentType,
    "cache-control": PRIVATE_NO_STORE,
    "x-content-type-options": "nosniff",
  });
  if (file.contentLength !== undefined) headers.set("content-length", String(file.contentLength));
  if (file.etag) headers.set("etag", file.etag);
  if (query.download === "1") headers.set("content-disposition", `attachment; filename="${file.downloadName}"`);
  return new Response(file.body, { status: 200, headers });
});
