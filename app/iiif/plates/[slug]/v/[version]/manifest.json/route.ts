import { getDb } from "@/db/client";
import { notFound } from "@/lib/errors";
import { PUBLIC, route } from "@/lib/http/route";
import { plateManifestResponse } from "@/lib/plates/documents";

export const dynamic = "force-dynamic";

// Every version keeps its own manifest, as its page keeps its own permanent link.
export const GET = route({ access: PUBLIC }, async ({ params }) => {
  // Digits only: "0x2" or "2e0" name no version.
  if (!/^[1-9]\d{0,5}$/.test(params.version)) throw notFound("That version");
  const version = Number(params.version);
  return plateManifestResponse(getDb(), params.slug, version);
});
