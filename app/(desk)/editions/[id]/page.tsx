import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { AddPlateButton } from "@/components/editions/add-plate-button";
import { DeleteEditionButton } from "@/components/editions/delete-edition-button";
import { EditionNameForm } from "@/components/editions/edition-name-form";
import { EmbargoForm } from "@/components/editions/embargo-form";
import { ExportPanel } from "@/components/editions/export-panel";
import { ItemLayoutForm } from "@/components/editions/item-layout-form";
import { ItemOrderButtons } from "@/components/editions/item-order-buttons";
import { NewestVersionButton } from "@/components/editions/newest-version-button";
import { PageTitle } from "@/components/page-title";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Table, TableBody, TableCell, TableEmptyRow, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { findEdition, listPickablePlates, type OtherEditionDto } from "@/lib/editions/editions";
import { listExports } from "@/lib/editions/export/exports";
import { SLOT_PRESETS, SLOT_SPECS } from "@/lib/editions/print-sizes";

export const metadata: Metadata = { title: "Edition builder" };
export const dynamic = "force-dynamic";

const SLOT_OPTIONS = [...SLOT_PRESETS.map((s) => ({ value: s, label: SLOT_SPECS[s].label })), { value: "custom", label: "Custom width in mm and dpi" }];

function editionName(e: OtherEditionDto): string {
  return `“${e.title}${e.issueLabel ? `, ${e.issueLabel}` : ""}”${e.embargoDate ? ` (embargo until ${e.embargoDate})` : ""}`;
}

export default async function EditionBuilderPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ q?: string | string[] }> }) {
  const { id } = await params;
  const sp = await searchParams;
  const q = typeof sp.q === "string" ? sp.q.slice(0, 100) : "";
  const actor = await requirePagePermission("editions:use", `/editions/${id}`);
  const db = getDb();
  const edition = await foundOr404(findEdition(db, actor, id));
  const pickable = await listPickablePlates(db, actor, id, q);
  const exports = await listExports(db, actor, id);
  // While a bundle is made its plates are held (the server refuses changes); after it, an exported edition is fixed.
  const exporting = exports.some((e) => e.state === "queued" || e.state === "running");
  const hasBundles = exports.some((e) => e.state === "done");
  const readOnly = edition.state !== "draft" || exporting;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link href="/editions">All editions</Link>
      </p>
      <PageTitle title={edition.title} lead={`${edition.kind === "journal" ? "Journal" : "Newsletter"}${edition.issueLabel ? `, ${edition.issueLabel}` : ""}. ${edition.items.length} plate${edition.items.length === 1 ? "" : "s"}.`}>
        <Badge tone={edition.state === "exported" ? "ok" : "neutral"}>{edition.state}</Badge>
      </PageTitle>

      <section aria-labelledby="name-h" className="mb-10">
        <h2 id="name-h" className="mb-4 text-xl font-semibold">
          Title and issue
        </h2>
        <EditionNameForm editionId={edition.id} title={edition.title} kind={edition.kind} issueLabel={edition.issueLabel} />
      </section>

      <section aria-labelledby="embargo-h" className="mb-10">
        <h2 id="embargo-h" className="mb-4 text-xl font-semibold">
          Embargo
        </h2>
        <EmbargoForm editionId={edition.id} embargoDate={edition.embargoDate} />
      </section>

      <section aria-labelledby="items-h">
        <h2 id="items-h" className="mb-4 text-xl font-semibold">
          Plates in this edition
        </h2>
        {exporting ? <p className="mb-3 text-sm font-medium">A print bundle is being made from these plates: they can change once it is done.</p> : null}
        <Table caption="Plates in print order, with the size each slot needs against what the rendition has" captionHidden>
          <TableHead>
            <TableRow>
              <TableHeader>No.</TableHeader>
              <TableHeader>Plate</TableHeader>
              <TableHeader>Layout</TableHeader>
              <TableHeader>Pixels needed and available</TableHeader>
              <TableHeader>Order</TableHeader>
            </TableRow>
          </TableHead>
          <TableBody>
            {edition.items.length === 0 ? <TableEmptyRow colSpan={5}>No plates yet. Add published plates from the list below.</TableEmptyRow> : null}
            {edition.items.map((item) => (
              <TableRow key={item.id}>
                <TableCell>{item.position}</TableCell>
                <TableCell>
                  <p className="font-medium">
                    <Link href={`/plates/${item.plate.slug}/v/${item.version}`}>{item.plate.title}</Link>
                  </p>
                  <p className="text-sm text-ink-muted">
                    Version {item.version}, by {item.plate.observer}
                  </p>
                  {readOnly || item.plate.state !== "published" ? null : (
                    <NewestVersionButton editionId={edition.id} itemId={item.id} plateTitle={item.plate.title} version={item.version} currentVersion={item.currentVersion} />
                  )}
                  {item.plate.state !== "published" ? (
                    <p role="note" className="mt-1 text-sm font-medium text-danger">
                      This plate is now {item.plate.state}.
                    </p>
                  ) : null}
                  {item.alsoIn.length ? (
                    <p role="note" className="mt-1 text-sm font-medium text-danger">
                      <span aria-hidden="true">⚠ </span>Also in {item.alsoIn.map(editionName).join(" and ")}.
                    </p>
                  ) : null}
                </TableCell>
                <TableCell>
                  <ItemLayoutForm
                    key={`${item.id}-v${item.version}`}
                    editionId={edition.id}
                    itemId={item.id}
                    plateTitle={item.plate.title}
                    slot={item.slot}
                    customWidthMm={item.customWidthMm}
                    customDpi={item.customDpi}
                    rendition={item.rendition}
                    renditions={item.renditions}
                    captionOverride={item.captionOverride}
                    plateCaption={item.plate.caption}
                    slotOptions={SLOT_OPTIONS}
                    readOnly={readOnly}
                  />
                </TableCell>
                <TableCell>
                  <p className="text-sm">{item.slotLabel}</p>
                  <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-2 text-sm">
                    <dt>Needed</dt>
                    <dd>{item.needed ? `${item.needed.width} x ${item.needed.height} px` : "—"}</dd>
                    <dt>Available</dt>
                    <dd>{item.available ? `${item.available.width} x ${item.available.height} px` : "unknown"}</dd>
                  </dl>
                  {item.sizeWarning ? (
                    <p role="note" className="mt-2 rounded-control border border-danger p-2 text-sm font-medium text-danger">
                      <span aria-hidden="true">⚠ </span>
                      {item.sizeWarning}
                    </p>
                  ) : item.needed ? (
                    <p className="mt-2 text-sm">Large enough: no enlargement.</p>
                  ) : null}
                </TableCell>
                <TableCell>{readOnly ? null : <ItemOrderButtons editionId={edition.id} itemId={item.id} plateTitle={item.plate.title} position={item.position} count={edition.items.length} />}</TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </section>

      <section aria-labelledby="exports-h" className="mt-10">
        <h2 id="exports-h" className="mb-4 text-xl font-semibold">
          Print bundle
        </h2>
        <ExportPanel editionId={edition.id} editionState={edition.state} itemCount={edition.items.length} initial={exports} />
      </section>

      {readOnly ? null : (
        <section aria-labelledby="picker-h" className="mt-10">
          <h2 id="picker-h" className="mb-4 text-xl font-semibold">
            Add a published plate
          </h2>
          <form method="get" role="search" aria-label="Published plates" className="mb-4 flex flex-wrap items-end gap-3">
            <Field label="Search title, caption or observer">
              <Input name="q" type="search" defaultValue={q} maxLength={100} />
            </Field>
            <Button type="submit">Search</Button>
            {q ? <Link href={`/editions/${edition.id}`}>Show all</Link> : null}
          </form>
          <Table caption={q ? `Published plates matching “${q}”` : "Published plates, newest first"}>
            <TableHead>
              <TableRow>
                <TableHeader>Plate</TableHeader>
                <TableHeader>Observer</TableHeader>
                <TableHeader>Version</TableHeader>
                <TableHeader>Other editions</TableHeader>
                <TableHeader>Add</TableHeader>
              </TableRow>
            </TableHead>
            <TableBody>
              {pickable.length === 0 ? <TableEmptyRow colSpan={5}>{q ? "No published plate matches." : "No plate has been published yet."}</TableEmptyRow> : null}
              {pickable.map((p) => (
                <TableRow key={p.id}>
                  <TableCell>{p.title}</TableCell>
                  <TableCell>{p.observer}</TableCell>
                  <TableCell>{p.version}</TableCell>
                  <TableCell>{p.alsoIn.length ? p.alsoIn.map(editionName).join(", ") : "none"}</TableCell>
                  <TableCell>{p.inThisEdition ? "In this edition" : <AddPlateButton editionId={edition.id} plateId={p.id} plateTitle={p.title} />}</TableCell>
                </TableRow>
              ))}
            </TableBody>
          </Table>
        </section>
      )}

      <section aria-labelledby="delete-h" className="mt-10">
        <h2 id="delete-h" className="mb-4 text-xl font-semibold">
          Delete the edition
        </h2>
        {exporting ? (
          <p className="text-sm">A print bundle is being made; the edition can be deleted only when that is over.</p>
        ) : edition.state !== "draft" || hasBundles ? (
          <p className="text-sm">This edition has gone to print: it and its bundles stay as a record of what went to print and cannot be deleted.</p>
        ) : (
          <DeleteEditionButton editionId={edition.id} title={edition.title} itemCount={edition.items.length} />
        )}
      </section>
    </>
  );
}
