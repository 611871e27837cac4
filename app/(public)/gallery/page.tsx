import type { Metadata } from "next";
import { GalleryGrid } from "@/components/gallery/gallery-grid";
import { PageTitle } from "@/components/page-title";
import { buttonClasses } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { getDb } from "@/db/client";
import { listPlateFacets, listPublishedPlates } from "@/lib/plates/public";
import { galleryQuerySchema } from "@/lib/plates/schemas";

export const metadata: Metadata = {
  title: "Gallery",
  description: "Composites of the solar corona made by the eclipse section's members, free to zoom into and to share.",
};

export default async function GalleryPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]).filter(([, v]) => v));
  // Bad filter values are dropped, not fatal: a shared link with a typo still shows plates.
  const parsed = galleryQuerySchema.safeParse(raw);
  const query = parsed.success ? parsed.data : {};
  const db = getDb();
  const [page, facets] = await Promise.all([
    listPublishedPlates(db, { eclipseId: query.eclipse, country: query.country, photographer: query.photographer, rendition: query.rendition, q: query.q }),
    listPlateFacets(db),
  ]);
  const qs = new URLSearchParams(Object.entries(query).filter(([k, v]) => v !== undefined && k !== "cursor").map(([k, v]) => [k, String(v)])).toString();
  const select = "rounded-control border border-line-strong bg-surface-raised px-3 py-2";
  return (
    <>
      <PageTitle title="Gallery" lead="The corona as the society's members recorded it. Open a plate to zoom from the whole corona down to a single prominence." />
      <form method="get" className="mb-8 flex flex-wrap items-end gap-4" role="search" aria-label="Filter plates">
        <label className="flex flex-col gap-1 text-sm">
          Search
          <input type="search" name="q" defaultValue={query.q ?? ""} placeholder="streamers, Luxor…" className={select} />
        </label>
        <label className="flex flex-col gap-1 text-sm">
          Eclipse
          <select name="eclipse" defaultValue={query.eclipse ?? ""} className={select}>
            <option value="">All eclipses</option>
            {facets.eclipses.map((e) => (
              <option key={e}>{e}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          Country of the site
          <select name="country" defaultValue={query.country ?? ""} className={select}>
            <option value="">Anywhere</option>
            {facets.countries.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          Photographer
          <select name="photographer" defaultValue={query.photographer ?? ""} className={select}>
            <option value="">Anyone</option>
            {facets.photographers.map((p) => (
              <option key={p}>{p}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          Rendition
          <select name="rendition" defaultValue={query.rendition ?? ""} className={select}>
            <option value="">Either</option>
            <option value="natural">Natural</option>
            <option value="structure">Structure</option>
          </select>
        </label>
        <button type="submit" className={buttonClasses({ variant: "primary" })}>
          Show plates
        </button>
      </form>
      {!parsed.success ? (
        <p role="alert" className="mb-6 text-sm text-warn">
          Some filters in the address were not understood and were left out.
        </p>
      ) : null}
      {page.plates.length === 0 ? (
        <EmptyState title="No plates match" message="Try fewer filters. New plates appear here once a curator has checked and published them." />
      ) : (
        <GalleryGrid key={qs} initial={page.plates} nextCursor={page.nextCursor} query={qs} />
      )}
    </>
  );
}
