import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { CompositeStartForm } from "@/components/composites/composite-start-form";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { EmptyState } from "@/components/ui/empty-state";
import { PageSection } from "@/components/ui/page-section";
import { linkColumn, RecordTable, type RecordColumn } from "@/components/ui/record-table";
import { STATE_TONES } from "@/components/reductions/labels";
import { getDb } from "@/db/client";
import { can } from "@/lib/auth/permissions";
import { listComposableReductions, listComposites } from "@/lib/composites/composites";
import { formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Composites" };

type Composite = Awaited<ReturnType<typeof listComposites>>[number];

const COLUMNS: RecordColumn<Composite>[] = [
  linkColumn("Title", (c) => `/studio/composites/${c.id}`, (c) => c.title),
  { header: "Inputs", cell: (c) => c.inputs.map((i) => i.setName).join(", ") },
  { header: "State", cell: (c) => <Badge tone={STATE_TONES[c.state]}>{c.state}</Badge> },
  { header: "Started", cell: (c) => formatDateTime(c.createdAt) },
];

export default async function CompositesPage() {
  const actor = await requirePagePermission("studio:use", "/studio/composites");
  const db = getDb();
  const [composites, choices] = await Promise.all([listComposites(db, actor), listComposableReductions(db, actor)]);
  return (
    <>
      <PageTitle title="Composites" lead="One corona from several finished reductions of one eclipse: a long lens for the inner corona and a short one for its reach, or several observers along the path.">
        <Link href="/studio">Back to the studio</Link>
      </PageTitle>
      <PageSection id="yours" title={can(actor.roles, "review:use") ? "All composites" : "Your composites"}>
        <RecordTable
          caption="Composites"
          captionHidden
          rows={composites}
          columns={COLUMNS}
          empty={{ title: "No composites yet", message: "Choose two or more reductions below to make the first." }}
        />
      </PageSection>
      <PageSection id="new" title="Compose">
        {choices.length < 2 ? (
          <EmptyState
            title="Fewer than two reductions to compose"
            message="A composite takes finished reductions registered on the Sun, with their site and capture times, so that each has sky coordinates. Reduce two bracket sets of one eclipse that way first."
          />
        ) : (
          <CompositeStartForm choices={choices} canComposeOthers={can(actor.roles, "review:use")} />
        )}
      </PageSection>
    </>
  );
}
