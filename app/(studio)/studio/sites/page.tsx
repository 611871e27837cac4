import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { buttonClasses } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { listSites } from "@/lib/sites/sites";

export const metadata: Metadata = { title: "Sites" };

const PRECISION_LABEL = { exact: "exact", rounded: "rounded to about 10 km", hidden: "hidden" } as const;

export default async function SitesPage() {
  const actor = await requirePagePermission("studio:use", "/studio/sites");
  const sites = await listSites(getDb(), actor);
  return (
    <>
      <PageTitle title="Sites" lead="Where you observe from: fixed places, or a ship or aircraft with its track.">
        <Link href="/studio/sites/new" className={buttonClasses({ variant: "primary" })}>
          New site
        </Link>
      </PageTitle>
      {sites.length === 0 ? (
        <EmptyState title="No sites yet" message="Add the place you will watch totality from; the planner computes its contact times." />
      ) : (
        <Table caption="Your sites">
          <TableHead>
            <TableRow>
              <TableHeader>Name</TableHeader>
              <TableHeader>Kind</TableHeader>
              <TableHeader>Position</TableHeader>
              <TableHeader>On public pages</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {sites.map((s) => (
              <TableRow key={s.id}>
                <TableCell>
                  <Link href={`/studio/sites/${s.id}`}>{s.name}</Link>
                </TableCell>
                <TableCell>{s.kind === "fixed" ? "fixed" : `moving (${s.trackPoints} track points)`}</TableCell>
                <TableCell className="font-mono text-sm">
                  {s.latDeg.toFixed(4)}°, {s.lonDeg.toFixed(4)}°{s.kind === "fixed" ? `, ${s.elevationM} m` : " (start of track)"}
                </TableCell>
                <TableCell>{PRECISION_LABEL[s.precision]}</TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      )}
    </>
  );
}
