import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { EclipseDto } from "@/lib/eclipses/eclipses";
import { describeEclipse, formatEclipseDate } from "./eclipse-words";

const KIND_TONE = { total: "accent", hybrid: "accent", annular: "warn", partial: "neutral" } as const;

export function formatPoint(lat: number | null, lon: number | null, digits = 1): string {
  if (lat === null || lon === null) return "no central line";
  return `${Math.abs(lat).toFixed(digits)}° ${lat >= 0 ? "N" : "S"}, ${Math.abs(lon).toFixed(digits)}° ${lon >= 0 ? "E" : "W"}`;
}

/**
 * A table from small tablets up; on a phone the same rows as a list of cards, so that
 * nothing scrolls sideways at 390 px (only one of the two is displayed at a time).
 */
export function EclipseTable({ caption, rows }: { caption: string; rows: EclipseDto[] }) {
  return (
    <>
      <Table caption={caption} wrapperClassName="hidden sm:block">
        <TableHead>
          <TableRow>
            <TableHeader>Date (greatest eclipse, UTC)</TableHeader>
            <TableHeader>Kind</TableHeader>
            <TableHeader>Greatest eclipse at</TableHeader>
            <TableHeader>Name</TableHeader>
            <TableHeader>
              <span className="sr-only">Actions</span>
            </TableHeader>
          </TableRow>
        </TableHead>
        <TableBody>
          {rows.map((e) => (
            <TableRow key={e.id}>
              <TableCell className="font-mono">
                <Link href={`/eclipses/${e.id}`}>
                  {e.id}
                  <span className="sr-only">: {describeEclipse(e)}</span>
                </Link>{" "}
                {e.peakAt.slice(11, 16)}
              </TableCell>
              <TableCell>
                <Badge tone={KIND_TONE[e.kind]}>{e.kind}</Badge>
              </TableCell>
              <TableCell className="font-mono text-sm">{formatPoint(e.peakLatDeg, e.peakLonDeg)}</TableCell>
              <TableCell>{e.name ?? ""}</TableCell>
              <TableCell>
                <Link href={`/planner?eclipse=${e.id}`} aria-label={`Plan the eclipse of ${e.id}`}>
                  Plan
                </Link>
              </TableCell>
            </TableRow>
          ))}
        </TableBody>
      </Table>
      <section aria-label={caption} className="sm:hidden">
        <h2 className="mb-3 text-base font-semibold text-ink">{caption}</h2>
        {rows.length ? (
          <ul className="flex flex-col gap-3">
            {rows.map((e) => (
              <li key={e.id} className="rounded-card border border-line bg-surface-raised p-4">
                <div className="flex flex-wrap items-center justify-between gap-2">
                  <Link href={`/eclipses/${e.id}`} className="font-semibold">
                    {formatEclipseDate(e.id)}
                  </Link>
                  <Badge tone={KIND_TONE[e.kind]}>{e.kind}</Badge>
                </div>
                {e.name ? <p className="mt-1 text-sm">{e.name}</p> : null}
                <p className="mt-1 font-mono text-sm text-ink-muted">
                  {e.peakAt.slice(11, 16)} UTC, {formatPoint(e.peakLatDeg, e.peakLonDeg)}
                </p>
                <Link href={`/planner?eclipse=${e.id}`} className="mt-2 inline-block text-sm" aria-label={`Plan the eclipse of ${e.id}`}>
                  Plan
                </Link>
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-sm text-ink-muted">None.</p>
        )}
      </section>
    </>
  );
}
