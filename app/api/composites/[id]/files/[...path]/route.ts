import { z } from "zod";
import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { openCompositeOutput } from "@/lib/composites/outputs";
import { PRIVATE_NO_STORE } from "@/lib/http/cache";

export const dynamic = "force-dynamic";

const querySchema = z.object({ download: z.enum(["0", "1"], { error: "expected 1 (download) or 0" }).optional() });

// One output of a composite, streamed from S3: visible to its composer, curators and the photographers of its
// inputs (others: 404). Not cached, as a reduction's files are not.
export const GET = route({ access: SIGNED_IN, query: querySchema }, async ({ actor, params, query }) => {
  const file = await openCompositeOutput(getDb(), actor, params.id, params.path ?? "");
  const headers = new Headers({ "content-type": file.contentType, "cache-control": PRIVATE_NO_STORE, "x-content-type-options": "nosniff" });
  if (file.contentLength !== undefined) headers.set("content-length", String(file.contentLength));
  if (file.etag) headers.set("etag", file.etag);
  if (query.download === "1") headers.set("content-disposition", `attachment; filename="${file.downloadName}"`);
  return new Response(file.body, { status: 200, headers });
});
