import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { AreaIntro } from "@/components/area-intro";

export const metadata: Metadata = { title: "Review desk" };

export default async function ReviewPage() {
  await requirePagePermission("review:use", "/review");
  return (
    <AreaIntro
      title="Review desk"
      lead="Bracket sets that members submit wait here for a curator."
      emptyTitle="Nothing waiting for review"
      emptyMessage="Submitted bracket sets will appear here with their reductions."
    />
  );
}
