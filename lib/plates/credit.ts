// A plate's credit line, from the society's template (admin settings): the
// same words on the plate page, in the IIIF manifest and inside the web JPEG.
import type { PlateLicence } from "@/db/schema/plates";
import { buildCreditLine } from "@/lib/review/credit-line";
import { LICENCE_INFO } from "./licences";

export interface CreditSource {
  acquiredBy: string;
  processedBy: string;
  licence: PlateLicence;
  /** ISO time; the year of publication fills {year} (this year for a draft). */
  publishedAt: string | null;
}

export function plateCreditLine(template: string, society: string, plate: CreditSource): string {
  const year = String(new Date(plate.publishedAt ?? Date.now()).getUTCFullYear());
  return buildCreditLine(template, { acquiredBy: plate.acquiredBy, processedBy: plate.processedBy, society, year, licence: LICENCE_INFO[plate.licence].shortName });
}
