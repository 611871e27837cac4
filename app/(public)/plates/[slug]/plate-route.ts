import type { Metadata } from "next";
import { foundOr404 } from "@/app/_server/found";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { getEnv } from "@/lib/env";
import { plateCreditLine } from "@/lib/plates/credit";
import { findPublicPlate, type PublicPlateDto } from "@/lib/plates/public";

export async function loadPlate(slug: string, version?: number): Promise<{ plate: PublicPlateDto; society: string; credit: string }> {
  const db = getDb();
  const [plate, settings] = await Promise.all([foundOr404(findPublicPlate(db, slug, version)), findSocietySettings(db)]);
  const credit = plateCreditLine(settings.creditLineTemplate, settings.name, { ...plate, licence: plate.licence.id });
  return { plate, society: settings.name, credit };
}

/** Titles, descriptions and an Open Graph image made from the plate, for links shared elsewhere. */
export async function plateMetadata(slug: string, version?: number): Promise<Metadata> {
  const { plate } = await loadPlate(slug, version);
  const base = getEnv().APP_URL.replace(/\/+$/, "");
  const description = plate.withdrawn ? `Withdrawn: ${plate.withdrawn.reason}` : plate.caption || plate.altText;
  return {
    title: plate.title,
    description,
    alternates: { canonical: `${base}/plates/${plate.slug}${plate.isCurrentVersion ? "" : `/v/${plate.version}`}` },
    openGraph: {
      type: "article",
      title: plate.title,
      description,
      url: `${base}/plates/${plate.slug}`,
      images: plate.withdrawn ? [] : [{ url: `${base}${plate.previewUrl}`, alt: plate.altText }],
    },
    twitter: { card: plate.withdrawn ? "summary" : "summary_large_image", title: plate.title, description },
  };
}
