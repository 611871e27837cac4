import type { MetadataRoute } from "next";
import { getDb } from "@/db/client";
import { getEnv } from "@/lib/env";
import { listPublishedPlates, type PlateCardDto } from "@/lib/plates/public";

export const dynamic = "force-dynamic";

// Public pages for search engines: the gallery, every published plate and the eclipses that have plates.
export default async function sitemap(): Promise<MetadataRoute.Sitemap> {
  const base = getEnv().APP_URL.replace(/\/+$/, "");
  const db = getDb();
  const all: PlateCardDto[] = [];
  let cursor: string | undefined;
  do {
    const page = await listPublishedPlates(db, { cursor, limit: 60 });
    all.push(...page.plates);
    cursor = page.nextCursor ?? undefined;
  } while (cursor && all.length < 10_000);
  const eclipses = [...new Set(all.map((p) => p.eclipseId))];
  return [
    { url: `${base}/`, changeFrequency: "weekly", priority: 1 },
    { url: `${base}/gallery`, changeFrequency: "daily", priority: 0.9 },
    { url: `${base}/eclipses`, changeFrequency: "monthly" },
    { url: `${base}/planner`, changeFrequency: "monthly" },
    ...eclipses.map((id) => ({ url: `${base}/eclipses/${id}`, changeFrequency: "weekly" as const })),
    ...all.map((p) => ({ url: `${base}/plates/${p.slug}`, lastModified: p.publishedAt ?? undefined, changeFrequency: "monthly" as const })),
  ];
}
