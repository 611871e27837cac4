import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { OwnListPage } from "@/components/studio/own-list-page";
import { linkColumn, type RecordColumn } from "@/components/ui/record-table";
import { getDb } from "@/db/client";
import { listKits } from "@/lib/kits/kits";

export const metadata: Metadata = { title: "Kits" };

const LEAD = "Your cameras and optics. The planner and the reductions use them for plate scale and field of view.";

type Kit = Awaited<ReturnType<typeof listKits>>[number];

const COLUMNS: RecordColumn<Kit>[] = [
  linkColumn("Name", (k) => `/studio/kits/${k.id}`, (k) => k.name),
  { header: "Camera", cell: (k) => k.camera },
  { header: "Focal length", className: "font-mono", cell: (k) => `${k.focalMm * k.teleconverter} mm${k.teleconverter !== 1 ? ` (${k.focalMm} × ${k.teleconverter})` : ""}` },
  { header: "f-number", className: "font-mono", cell: (k) => `f/${k.fNumber * k.teleconverter}` },
  { header: "Mount", cell: (k) => k.mount },
];

export default async function KitsPage() {
  const actor = await requirePagePermission("studio:use", "/studio/kits");
  return (
    <OwnListPage noun={{ one: "kit", many: "kits" }} lead={LEAD} emptyMessage="Describe the camera and lens you will take to totality." columns={COLUMNS} rows={await listKits(getDb(), actor)} />
  );
}
