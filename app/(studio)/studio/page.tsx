import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { AreaIntro } from "@/components/area-intro";

export const metadata: Metadata = { title: "Studio" };

export default async function StudioPage() {
  const actor = await requirePagePermission("studio:use", "/studio");
  return (
    <AreaIntro
      title="Studio"
      lead={`${actor.name}: your kits, sites and bracket sets.`}
      emptyTitle="No bracket sets yet"
      emptyMessage="When bracket uploads open, the sets you bring back from totality will be listed here with their reductions."
    />
  );
}
