import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { EclipseDto } from "@/lib/eclipses/eclipses";

const KIND_TONE = { total: "accent", hybrid: "accent", annular: "warn", partial: "neutral" } as const;

export function formatPoint(lat: number | null, lon: number | null): string {
  if (lat === null || lon === null) return "no central line";
  return `${Math.abs(lat).toFixed(1)}° ${lat >= 0 ? "N" : "S"}, ${Math.abs(lon).toFixed(1)}° ${lon >= 0 ? "E" : "W"}`;
}

export function EclipseTable({ caption, rows }: { caption: string; rows: EclipseDto[] }) {
  return (
    <Table caption={caption}>
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
              <Link href={`/eclipses/${e.id}`}>{e.id}</Link> {e.peakAt.slice(11, 16)}
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
  );
}
