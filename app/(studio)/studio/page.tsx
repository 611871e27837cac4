import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { LinkCards } from "@/components/link-cards";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { linkColumn, RecordTable, type RecordColumn } from "@/components/ui/record-table";
import { getDb } from "@/db/client";
import { listBracketSets } from "@/lib/bracket-sets";
import { listKits } from "@/lib/kits/kits";
import { findLatestReductions } from "@/lib/reductions/latest";
import { STATE_LABELS } from "@/lib/review/state-machine";
import { listSites } from "@/lib/sites/sites";

export const metadata: Metadata = { title: "Studio" };

type BracketSet = Awaited<ReturnType<typeof listBracketSets>>[number];
type Latest = Awaited<ReturnType<typeof findLatestReductions>>;

function setColumns(latest: Latest): RecordColumn<BracketSet>[] {
  return [
    linkColumn("Name", (s) => `/studio/sets/${s.id}`, (s) => s.name),
    { header: "Eclipse", className: "font-mono", cell: (s) => s.eclipseId },
    { header: "Frames", className: "font-mono", cell: (s) => s.frameCount },
    { header: "State", cell: (s) => <Badge tone={s.state === "approved" ? "ok" : s.state === "rejected" ? "danger" : "neutral"}>{STATE_LABELS[s.state]}</Badge> },
    {
      header: "Latest reduction",
      cell: (s) => {
        const r = latest.get(s.id);
        return r ? (
          <Link href={`/studio/reductions/${r.id}`}>
            {r.state}
            {r.state === "running" ? ` (${Math.round(100 * (r.progress ?? 0))} %)` : ""}
          </Link>
        ) : (
          <span className="text-ink-muted">none yet</span>
        );
      },
    },
    { header: "Camera clock offset", className: "font-mono", cell: (s) => `${s.clockOffsetS} s` },
  ];
}

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
      <RecordTable
        caption="Your bracket sets"
        captionHidden
        rows={ownSets}
        columns={setColumns(latest)}
        empty={{
          title: "No bracket sets yet",
          message: "A bracket set holds one camera's frames from one eclipse. Create one, add its frames from your computer, and start a reduction.",
        }}
      />
    </>
  );
}
