import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { OwnListPage } from "@/components/studio/own-list-page";
import { linkColumn, type RecordColumn } from "@/components/ui/record-table";
import { getDb } from "@/db/client";
import { listSites } from "@/lib/sites/sites";

export const metadata: Metadata = { title: "Sites" };

const LEAD = "Where you observe from: fixed places, or a ship or aircraft with its track.";

const PRECISION_LABEL = { exact: "exact", rounded: "rounded to about 10 km", hidden: "hidden" } as const;

type Site = Awaited<ReturnType<typeof listSites>>[number];

const COLUMNS: RecordColumn<Site>[] = [
  linkColumn("Name", (s) => `/studio/sites/${s.id}`, (s) => s.name),
  { header: "Kind", cell: (s) => (s.kind === "fixed" ? "fixed" : `moving (${s.trackPoints} track points)`) },
  {
    header: "Position",
    className: "font-mono text-sm",
    cell: (s) => `${s.latDeg.toFixed(4)}°, ${s.lonDeg.toFixed(4)}°${s.kind === "fixed" ? `, ${s.elevationM} m` : " (start of track)"}`,
  },
  { header: "On public pages", cell: (s) => PRECISION_LABEL[s.precision] },
];

export default async function SitesPage() {
  const actor = await requirePagePermission("studio:use", "/studio/sites");
  return (
    <OwnListPage noun={{ one: "site", many: "sites" }} lead={LEAD} emptyMessage="Add the place you will watch totality from; the planner computes its contact times." columns={COLUMNS} rows={await listSites(getDb(), actor)} />
  );
}
