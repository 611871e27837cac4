import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { LinkCards } from "@/components/link-cards";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { EmptyState } from "@/components/ui/empty-state";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { listBracketSets } from "@/lib/bracket-sets";
import { listKits } from "@/lib/kits/kits";
import { listSites } from "@/lib/sites/sites";

export const metadata: Metadata = { title: "Studio" };

export default async function StudioPage() {
  const actor = await requirePagePermission("studio:use", "/studio");
  const [kits, sites, sets] = await Promise.all([listKits(getDb(), actor), listSites(getDb(), actor), listBracketSets(getDb(), actor)]);
  const ownSets = sets.filter((s) => s.isOwn);
  const cards = [
    { href: "/studio/kits", title: "Kits", text: `${kits.length} camera and optics profile${kits.length === 1 ? "" : "s"}` },
    { href: "/studio/sites", title: "Sites", text: `${sites.length} observing site${sites.length === 1 ? "" : "s"}` },
    { href: "/planner", title: "Field planner", text: "Contact times, exposure ladder and framing for a site and kit" },
  ];
  return (
    <>
      <PageTitle title="Studio" lead={`${actor.name}: your kits, sites and bracket sets.`} />
      <div className="mb-10">
        <LinkCards cards={cards} />
      </div>
      {ownSets.length === 0 ? (
        <EmptyState
          title="No bracket sets yet"
          message="Bracket sets you bring back from totality will be listed here with their reductions. Uploading from the browser is the next step of this workspace."
        />
      ) : (
        <Table caption="Your bracket sets">
          <TableHead>
            <TableRow>
              <TableHeader>Name</TableHeader>
              <TableHeader>Eclipse</TableHeader>
              <TableHeader>Frames</TableHeader>
              <TableHeader>State</TableHeader>
              <TableHeader>Camera clock offset</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {ownSets.map((s) => (
              <TableRow key={s.id}>
                <TableCell>{s.name}</TableCell>
                <TableCell className="font-mono">{s.eclipseId}</TableCell>
                <TableCell className="font-mono">{s.frameCount}</TableCell>
                <TableCell>
                  <Badge tone={s.state === "approved" ? "ok" : s.state === "rejected" ? "danger" : "neutral"}>{s.state}</Badge>
                </TableCell>
                <TableCell className="font-mono">{s.clockOffsetS} s</TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      )}
    </>
  );
}
