import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { buttonClasses } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { listKits } from "@/lib/kits/kits";

export const metadata: Metadata = { title: "Kits" };

export default async function KitsPage() {
  const actor = await requirePagePermission("studio:use", "/studio/kits");
  const kits = await listKits(getDb(), actor);
  return (
    <>
      <PageTitle title="Kits" lead="Your cameras and optics. The planner and the reductions use them for plate scale and field of view.">
        <Link href="/studio/kits/new" className={buttonClasses({ variant: "primary" })}>
          New kit
        </Link>
      </PageTitle>
      {kits.length === 0 ? (
        <EmptyState title="No kits yet" message="Describe the camera and lens you will take to totality." />
      ) : (
        <Table caption="Your kits">
          <TableHead>
            <TableRow>
              <TableHeader>Name</TableHeader>
              <TableHeader>Camera</TableHeader>
              <TableHeader>Focal length</TableHeader>
              <TableHeader>f-number</TableHeader>
              <TableHeader>Mount</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {kits.map((k) => (
              <TableRow key={k.id}>
                <TableCell>
                  <Link href={`/studio/kits/${k.id}`}>{k.name}</Link>
                </TableCell>
                <TableCell>{k.camera}</TableCell>
                <TableCell className="font-mono">
                  {k.focalMm * k.teleconverter} mm{k.teleconverter !== 1 ? ` (${k.focalMm} × ${k.teleconverter})` : ""}
                </TableCell>
                <TableCell className="font-mono">f/{k.fNumber * k.teleconverter}</TableCell>
                <TableCell>{k.mount}</TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      )}
    </>
  );
}
