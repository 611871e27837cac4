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
        {edition.items.length === 0 ? <p className="text-ink-muted">No plates yet. Add published plates from the list below.</p> : null}
        <ol className="flex flex-col gap-6" aria-label="Plates in print order">
          {edition.items.map((item) => (
            <li key={item.id} className="grid gap-4 rounded-card border border-line p-4 md:grid-cols-[8rem_minmax(0,1fr)]">
              <div className="flex flex-row items-start gap-3 md:flex-col">
                {/* eslint-disable-next-line @next/next/no-img-element -- the version's own preview, served already small */}
                <img src={item.thumbnailUrl} alt="" width={128} height={96} loading="lazy" className="aspect-[4/3] w-24 rounded-control border border-line bg-black object-contain md:w-32" />
                <div className="flex flex-col gap-2">
                  <p className="text-sm text-ink-muted">Plate {item.position} of {edition.items.length}</p>
                  {readOnly ? null : <ItemOrderButtons editionId={edition.id} itemId={item.id} plateTitle={item.plate.title} position={item.position} count={edition.items.length} />}
                </div>
              </div>
              <div className="flex min-w-0 flex-col gap-3">
                <div>
                  <h3 className="font-medium">
                    <Link href={`/plates/${item.plate.slug}/v/${item.version}`}>{item.plate.title}</Link>
                  </h3>
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
                </div>
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
                  imageSizes={item.imageSizes}
                  captionOverride={item.captionOverride}
                  plateCaption={item.plate.caption}
                  slotOptions={SLOT_OPTIONS}
                  readOnly={readOnly}
                />
              </div>
            </li>
          ))}
        </ol>
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
