import { getDb } from "@/db/client";
import { json, PUBLIC, route } from "@/lib/http/route";
import { listPublishedPlates } from "@/lib/plates/public";
import { galleryQuerySchema } from "@/lib/plates/schemas";

export const dynamic = "force-dynamic";

// The gallery's pages of published plates; drafts and withdrawn plates never appear.
export const GET = route({ access: PUBLIC, query: galleryQuerySchema }, async ({ query }) => {
  const page = await listPublishedPlates(getDb(), {
    eclipseId: query.eclipse,
    country: query.country || undefined,
    photographer: query.photographer || undefined,
    rendition: query.rendition,
    q: query.q || undefined,
    cursor: query.cursor,
    limit: query.limit,
  });
  return json(page, { headers: { "cache-control": "public, max-age=30" } });
});
