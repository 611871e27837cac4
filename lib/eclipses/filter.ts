// Filters of the public eclipse list, read from the address. A bad value is
// dropped with a sentence for the visitor, never an error page.
import { z } from "zod";
import type { EclipseDto } from "./eclipses";

export const ECLIPSE_KINDS = ["total", "annular", "hybrid", "partial"] as const;
export const ECLIPSE_WHEN = ["coming", "past"] as const;

const kindSchema = z.enum(ECLIPSE_KINDS);
const whenSchema = z.enum(ECLIPSE_WHEN);

export interface EclipseFilter {
  kind?: (typeof ECLIPSE_KINDS)[number];
  when?: (typeof ECLIPSE_WHEN)[number];
}

export function parseEclipseFilter(raw: Record<string, string | string[] | undefined>): { filter: EclipseFilter; problems: string[] } {
  const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) || undefined;
  const filter: EclipseFilter = {};
  const problems: string[] = [];
  const kind = first(raw.kind);
  if (kind !== undefined) {
    const r = kindSchema.safeParse(kind);
    if (r.success) filter.kind = r.data;
    else problems.push(`Kind: expected total, annular, hybrid or partial; the address gave “${kind.slice(0, 40)}”, so every kind is shown.`);
  }
  const when = first(raw.when);
  if (when !== undefined) {
    const r = whenSchema.safeParse(when);
    if (r.success) filter.when = r.data;
    else problems.push(`When: expected coming or past; the address gave “${when.slice(0, 40)}”, so both are shown.`);
  }
  return { filter, problems };
}

export function filterEclipses(rows: EclipseDto[], filter: EclipseFilter): EclipseDto[] {
  return filter.kind ? rows.filter((e) => e.kind === filter.kind) : rows;
}
