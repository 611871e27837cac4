import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { EclipseEditRow } from "@/components/eclipses/eclipse-edit-row";
import { PageTitle } from "@/components/page-title";
import { getDb } from "@/db/client";
import { listEclipses } from "@/lib/eclipses/eclipses";
import { editEclipseAction } from "./actions";

export const metadata: Metadata = { title: "Eclipse catalogue" };

export default async function AdminEclipsesPage() {
  await requirePagePermission("eclipses:edit", "/admin/eclipses");
  const { upcoming, past } = await listEclipses(getDb());
  return (
    <>
      <PageTitle title="Eclipse catalogue" lead="The catalogue is computed; here you give an eclipse a name and feature it on the public pages." />
      <h2 className="mb-2 text-xl font-semibold">Coming</h2>
      {upcoming.map((e) => (
        <EclipseEditRow key={e.id} action={editEclipseAction} id={e.id} kind={e.kind} name={e.name} featured={e.featured} />
      ))}
      <h2 className="mt-8 mb-2 text-xl font-semibold">Past</h2>
      {past.map((e) => (
        <EclipseEditRow key={e.id} action={editEclipseAction} id={e.id} kind={e.kind} name={e.name} featured={e.featured} />
      ))}
    </>
  );
}
