import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { EclipseCatalogueForm } from "@/components/eclipses/eclipse-catalogue-form";
import { PageTitle } from "@/components/page-title";
import { getDb } from "@/db/client";
import { listEclipses } from "@/lib/eclipses/eclipses";
import { saveCatalogueAction } from "./actions";

export const metadata: Metadata = { title: "Eclipse catalogue" };

export default async function AdminEclipsesPage() {
  await requirePagePermission("eclipses:edit", "/admin/eclipses");
  const { upcoming, past } = await listEclipses(getDb());
  const row = (e: (typeof upcoming)[number]) => ({ id: e.id, kind: e.kind, name: e.name, featured: e.featured });
  return (
    <>
      <PageTitle title="Eclipse catalogue" lead="The catalogue is computed; here you give eclipses names and feature them on the public pages. Change as many rows as you like, then save once." />
      <EclipseCatalogueForm
        action={saveCatalogueAction}
        groups={[
          { title: "Coming", rows: upcoming.map(row) },
          { title: "Past", rows: past.map(row) },
        ]}
      />
    </>
  );
}
