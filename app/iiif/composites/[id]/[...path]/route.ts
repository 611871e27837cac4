import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { serveOutputFile } from "@/lib/reductions/files/serve";

export const dynamic = "force-dynamic";

// Tiles (IIIF Image API level 0 and Deep Zoom), preview, contribution map and downloads of a composite a published plate shows
// (lib/reductions/files: the manifest says which, serve.ts who may have them).
export const GET = route({ access: PUBLIC }, async ({ req, actor, params }) => {
  const search = new URL(req.url).searchParams;
  return serveOutputFile(getDb(), actor, { kind: "composite", id: params.id }, params.path ?? "", {
    route: "public",
    download: search.get("download") === "1",
    downloadName: search.get("name"),
    ifNoneMatch: req.headers.get("if-none-match"),
  });
});
