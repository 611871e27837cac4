import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { NewEditionForm } from "@/components/editions/new-edition-form";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { Table, TableBody, TableCell, TableEmptyRow, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { listEditions } from "@/lib/editions/editions";

export const metadata: Metadata = { title: "Editions" };
export const dynamic = "force-dynamic";

export default async function EditionsPage() {
  const actor = await requirePagePermission("editions:use", "/editions");
  const editions = await listEditions(getDb(), actor);
  return (
    <>
      <PageTitle title="Editions" lead="Newsletter and journal issues, with the published plates chosen for each and the size each will print at." />
      <Table caption="Editions, newest first">
        <TableHead>
          <TableRow>
            <TableHeader>Title</TableHeader>
            <TableHeader>Kind</TableHeader>
            <TableHeader>Issue</TableHeader>
            <TableHeader>Embargo until</TableHeader>
            <TableHeader>Plates</TableHeader>
            <TableHeader>State</TableHeader>
          </TableRow>
        </TableHead>
        <TableBody>
          {editions.length === 0 ? <TableEmptyRow colSpan={6}>No edition has been started. Start one below.</TableEmptyRow> : null}
          {editions.map((e) => (
            <TableRow key={e.id}>
              <TableCell>
                <Link href={`/editions/${e.id}`}>{e.title}</Link>
              </TableCell>
              <TableCell>{e.kind}</TableCell>
              <TableCell>{e.issueLabel || "—"}</TableCell>
              <TableCell>{e.embargoDate ?? "none"}</TableCell>
              <TableCell>{e.itemCount}</TableCell>
              <TableCell>
                <Badge tone={e.state === "exported" ? "ok" : "neutral"}>{e.state}</Badge>
              </TableCell>
            </TableRow>
          ))}
        </TableBody>
      </Table>
      <section aria-labelledby="new-edition-h" className="mt-10">
        <h2 id="new-edition-h" className="mb-4 text-xl font-semibold">
          Start an edition
        </h2>
        <NewEditionForm />
      </section>
    </>
  );
}
