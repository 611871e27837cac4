import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { Table, TableBody, TableCell, TableEmptyRow, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { PLATE_STATES, type PlateState } from "@/db/schema/plates";
import { listDeskPlates } from "@/lib/plates/desk-view";
import { formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Plates" };
export const dynamic = "force-dynamic";

const STATE_LABEL: Record<PlateState, string> = { draft: "Drafts", published: "Published", withdrawn: "Withdrawn" };

export default async function DeskPlatesPage() {
  const actor = await requirePagePermission("review:use", "/review/plates");
  const plates = await listDeskPlates(getDb(), actor);
  return (
    <>
      <PageTitle title="Plates" lead="Every plate by state: drafts to finish, published plates, and withdrawn ones with open reports." />
      {PLATE_STATES.map((state) => {
        const rows = plates.filter((p) => p.state === state);
        return (
          <section key={state} aria-labelledby={`plates-${state}`} className="mb-10">
            <h2 id={`plates-${state}`} className="mb-3 text-xl font-semibold">
              {STATE_LABEL[state]} ({rows.length})
            </h2>
            <Table caption={`${STATE_LABEL[state]} plates`} captionHidden>
              <TableHead>
                <TableRow>
                  <TableHeader>Title</TableHeader>
                  <TableHeader>Bracket set</TableHeader>
                  <TableHeader>Photographer</TableHeader>
                  <TableHeader>Version</TableHeader>
                  <TableHeader>Open reports</TableHeader>
                  <TableHeader>Last change</TableHeader>
                </TableRow>
              </TableHead>
              <TableBody>
                {rows.length === 0 ? <TableEmptyRow colSpan={6}>None.</TableEmptyRow> : null}
                {rows.map((p) => (
                  <TableRow key={p.id}>
                    <TableCell>
                      <Link href={`/review/plates/${p.id}`} className="underline">
                        {p.title}
                      </Link>
                      {p.withdrawnKind ? <span className="ml-2 text-sm text-ink-muted">({p.withdrawnKind === "temporary" ? "for the time being" : "for good"})</span> : null}
                    </TableCell>
                    <TableCell>{p.setName}</TableCell>
                    <TableCell>{p.photographer}</TableCell>
                    <TableCell>{p.currentVersion}</TableCell>
                    <TableCell>{p.openReports ? <Badge tone="warn">{p.openReports}</Badge> : "0"}</TableCell>
                    <TableCell>{formatDateTime(p.updatedAt)}</TableCell>
                  </TableRow>
                ))}
              </TableBody>
            </Table>
          </section>
        );
      })}
    </>
  );
}
