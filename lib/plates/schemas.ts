// The gallery's query, checked at the API boundary. Client-safe.
import { z } from "zod";
import { strictNumber } from "@/lib/strict-number";

export const galleryQuerySchema = z.object({
  eclipse: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date such as 2027-08-02" }).optional(),
  country: z.string().trim().max(80).optional(),
  photographer: z.string().trim().max(120).optional(),
  rendition: z.enum(["natural", "structure"], { error: "expected natural or structure" }).optional(),
  q: z.string().trim().max(120, { error: "at most 120 characters" }).optional(),
  cursor: z.string().max(120).optional(),
  limit: strictNumber(z.number().int().min(1).max(60).optional()),
});
export type GalleryQuery = z.infer<typeof galleryQuerySchema>;
