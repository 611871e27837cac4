import { getDb } from "@/db/client";
import { notFound } from "@/lib/errors";
import { PUBLIC, route } from "@/lib/http/route";
import { plateManifestResponse } from "@/lib/plates/documents";

export const dynamic = "force-dynamic";

// Every version keeps its own manifest, as its page keeps its own permanent link.
export const GET = route({ access: PUBLIC }, async ({ params }) => {
  const version = Number(params.version);
  if (!Number.isInteger(version) || version < 1) throw notFound("That version");
  return plateManifestResponse(getDb(), params.slug, version);
});
