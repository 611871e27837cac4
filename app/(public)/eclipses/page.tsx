import type { Metadata } from "next";
import { Feedback } from "@/components/ui/feedback";
import { EclipseFilterForm } from "@/components/eclipses/eclipse-filter-form";
import { EclipseTable } from "@/components/eclipses/eclipse-table";
import { PageTitle } from "@/components/page-title";
import { getDb } from "@/db/client";
import { listEclipses } from "@/lib/eclipses/eclipses";
import { filterEclipses, parseEclipseFilter } from "@/lib/eclipses/filter";

export const metadata: Metadata = { title: "Solar eclipses 2000 to 2050" };

export default async function EclipsesPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { filter, problems } = parseEclipseFilter(await searchParams);
  const { featured, upcoming, past } = await listEclipses(getDb());
  const coming = filterEclipses(upcoming, filter);
  const gone = filterEclipses(past, filter);
  const kindWord = filter.kind ? `${filter.kind} ` : "";
  return (
    <>
      <PageTitle
        title="Solar eclipses, 2000 to 2050"
        lead="Computed from the positions of the Sun and Moon (astronomy-engine), not copied from a table. Choose one to plan your observations."
      />
      {problems.length ? (
        <div className="mb-6">
          <Feedback look="box" problem={problems.join(" ")} />
        </div>
      ) : null}
      <EclipseFilterForm filter={filter} />
      <div className="flex flex-col gap-10">
        {featured.length && !filter.kind && !filter.when ? <EclipseTable caption="Featured by the society" rows={featured} /> : null}
        {filter.when !== "past" ? <EclipseTable caption={`Coming ${kindWord}eclipses (${coming.length})`} rows={coming} /> : null}
        {filter.when !== "coming" ? <EclipseTable caption={`Past ${kindWord}eclipses (${gone.length})`} rows={gone} /> : null}
      </div>
    </>
  );
}
