import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { servePlateSourceFile } from "@/lib/plates/reduction-files";

export const dynamic = "force-dynamic";

// Tiles (IIIF Image API level 0 and Deep Zoom), preview and downloads of a reduction.
export const GET = route({ access: PUBLIC }, async ({ req, actor, params }) => {
  const search = new URL(req.url).searchParams;
  return servePlateSourceFile(getDb(), actor, { kind: "reduction", id: params.id }, params.path, search.get("download") === "1", search.get("name"), req.headers.get("if-none-match"));
});
