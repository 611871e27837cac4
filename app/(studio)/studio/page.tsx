import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { LinkCards } from "@/components/link-cards";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { listBracketSets } from "@/lib/bracket-sets";
import { listKits } from "@/lib/kits/kits";
import { findLatestReductions } from "@/lib/reductions/latest";
import { STATE_LABELS } from "@/lib/review/state-machine";
import { listSites } from "@/lib/sites/sites";

export const metadata: Metadata = { title: "Studio" };

export default async function StudioPage() {
  const actor = await requirePagePermission("studio:use", "/studio");
  const [kits, sites, sets] = await Promise.all([listKits(getDb(), actor), listSites(getDb(), actor), listBracketSets(getDb(), actor)]);
  const ownSets = sets.filter((s) => s.isOwn);
  const latest = await findLatestReductions(getDb(), ownSets.map((s) => s.id));
  const cards = [
    { href: "/studio/kits", title: "Kits", text: `${kits.length} camera and optics profile${kits.length === 1 ? "" : "s"}` },
    { href: "/studio/sites", title: "Sites", text: `${sites.length} observing site${sites.length === 1 ? "" : "s"}` },
    { href: "/studio/composites", title: "Composites", text: "One corona from several kits or observers of one eclipse" },
    { href: "/planner", title: "Field planner", text: "Contact times, exposure ladder and framing for a site and kit" },
  ];
  return (
    <>
      <PageTitle title="Studio" lead={`${actor.name}: your kits, sites and bracket sets.`} />
      <div className="mb-10">
        <LinkCards cards={cards} />
      </div>
      <div className="mb-4 flex flex-wrap items-center justify-between gap-4">
        <h2 className="text-xl font-semibold">Bracket sets</h2>
        <Link href="/studio/sets/new" className={buttonClasses({ variant: "primary" })}>
          New bracket set
        </Link>
      </div>
      {ownSets.length === 0 ? (
        <EmptyState
          title="No bracket sets yet"
          message="A bracket set holds one camera's frames from one eclipse. Create one, add its frames from your computer, and start a reduction."
        />
      ) : (
        <Table caption="Your bracket sets" captionHidden>
          <TableHead>
            <TableRow>
              <TableHeader>Name</TableHeader>
              <TableHeader>Eclipse</TableHeader>
              <TableHeader>Frames</TableHeader>
              <TableHeader>State</TableHeader>
              <TableHeader>Latest reduction</TableHeader>
              <TableHeader>Camera clock offset</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {ownSets.map((s) => (
              <TableRow key={s.id}>
                <TableCell>
                  <Link href={`/studio/sets/${s.id}`}>{s.name}</Link>
                </TableCell>
                <TableCell className="font-mono">{s.eclipseId}</TableCell>
                <TableCell className="font-mono">{s.frameCount}</TableCell>
                <TableCell>
                  <Badge tone={s.state === "approved" ? "ok" : s.state === "rejected" ? "danger" : "neutral"}>{STATE_LABELS[s.state]}</Badge>
                </TableCell>
                <TableCell>
                  {latest.get(s.id) ? (
                    <Link href={`/studio/reductions/${latest.get(s.id)?.id}`}>
                      {latest.get(s.id)?.state}
                      {latest.get(s.id)?.state === "running" ? ` (${Math.round(100 * (latest.get(s.id)?.progress ?? 0))} %)` : ""}
                    </Link>
                  ) : (
                    <span className="text-ink-muted">none yet</span>
                  )}
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
