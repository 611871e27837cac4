import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { AreaIntro } from "@/components/area-intro";

export const metadata: Metadata = { title: "Editions" };

export default async function EditionsPage() {
  await requirePagePermission("editions:use", "/editions");
  return (
    <AreaIntro
      title="Editions"
      lead="Newsletter and journal issues, with the plates chosen for each."
      emptyTitle="No editions yet"
      emptyMessage="Editions are built from published plates; none has been started."
    />
  );
}
