import type { Metadata } from "next";
import { EclipseTable } from "@/components/eclipses/eclipse-table";
import { PageTitle } from "@/components/page-title";
import { getDb } from "@/db/client";
import { listEclipses } from "@/lib/eclipses/eclipses";

export const metadata: Metadata = { title: "Solar eclipses 2000 to 2050" };

export default async function EclipsesPage() {
  const { featured, upcoming, past } = await listEclipses(getDb());
  return (
    <>
      <PageTitle
        title="Solar eclipses, 2000 to 2050"
        lead="Computed from the positions of the Sun and Moon (astronomy-engine), not copied from a table. Choose one to plan your observations."
      />
      <div className="flex flex-col gap-10">
        {featured.length ? <EclipseTable caption="Featured by the society" rows={featured} /> : null}
        <EclipseTable caption={`Coming (${upcoming.length})`} rows={upcoming} />
        <EclipseTable caption={`Past (${past.length})`} rows={past} />
      </div>
    </>
  );
}
