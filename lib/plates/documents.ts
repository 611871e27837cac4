// The IIIF documents as responses: JSON-LD with the Presentation 3.0 profile,
// open to other sites (CORS), briefly cached (a plate can be withdrawn).
import type { DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { getEnv } from "@/lib/env";
import { notFound } from "@/lib/errors";
import { plateCreditLine } from "./credit";
import { buildEclipseCollection, buildPlateManifest } from "./iiif";
import { findPublicPlate, listPublishedPlates, type PlateCardDto } from "./public";
import { PUBLIC_REVALIDATE } from "@/lib/http/cache";

function appUrl(): string {
  return getEnv().APP_URL.replace(/\/+$/, "");
}

function iiifJson(doc: Record<string, unknown>): Response {
  return new Response(JSON.stringify(doc, null, 2), {
    headers: {
      "content-type": 'application/ld+json;profile="http://iiif.io/api/presentation/3/context.json"',
      "access-control-allow-origin": "*",
      "cache-control": PUBLIC_REVALIDATE,
    },
  });
}

export async function plateManifestResponse(db: DbOrTx, slug: string, version?: number): Promise<Response> {
  const plate = await findPublicPlate(db, slug, version);
  // A withdrawn plate keeps its page, not its manifest: other viewers must stop showing it.
  if (plate.withdrawn) throw notFound("That plate's manifest");
  const society = await findSocietySettings(db);
  const credit = plateCreditLine(society.creditLineTemplate, society.name, { ...plate, licence: plate.licence.id });
  return iiifJson(buildPlateManifest(plate, appUrl(), credit));
}

export async function eclipseCollectionResponse(db: DbOrTx, eclipseId: string): Promise<Response> {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(eclipseId)) throw notFound("That eclipse");
  const all: PlateCardDto[] = [];
  let cursor: string | undefined;
  do {
    const page = await listPublishedPlates(db, { eclipseId, cursor, limit: 60 });
    all.push(...page.plates);
    cursor = page.nextCursor ?? undefined;
  } while (cursor);
  return iiifJson(buildEclipseCollection(eclipseId, all, appUrl()));
}
