import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { servePlateSourceFile } from "@/lib/plates/reduction-files";

export const dynamic = "force-dynamic";

// Tiles (IIIF Image API level 0 and Deep Zoom), preview, contribution map and downloads of a composite.
export const GET = route({ access: PUBLIC }, async ({ req, actor, params }) => {
  const search = new URL(req.url).searchParams;
  return servePlateSourceFile(getDb(), actor, { kind: "composite", id: params.id }, params.path, search.get("download") === "1", search.get("name"), req.headers.get("if-none-match"));
});
