import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { LinkCards } from "@/components/link-cards";
import { PageTitle } from "@/components/page-title";
import { EmptyState } from "@/components/ui/empty-state";
import { getDb } from "@/db/client";
import { listKits } from "@/lib/kits/kits";
import { listSites } from "@/lib/sites/sites";

export const metadata: Metadata = { title: "Studio" };

export default async function StudioPage() {
  const actor = await requirePagePermission("studio:use", "/studio");
  const [kits, sites] = await Promise.all([listKits(getDb(), actor), listSites(getDb(), actor)]);
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
      <EmptyState
        title="No bracket sets yet"
        message="When bracket uploads open, the sets you bring back from totality will be listed here with their reductions."
      />
    </>
  );
}
