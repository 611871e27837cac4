import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { BracketSetForm } from "@/components/bracket-sets/bracket-set-form";
import { PageTitle } from "@/components/page-title";
import { EmptyState } from "@/components/ui/empty-state";
import { getDb } from "@/db/client";
import { listEclipses } from "@/lib/eclipses/eclipses";
import { listKits } from "@/lib/kits/kits";
import { listSites } from "@/lib/sites/sites";
import { createBracketSetAction } from "../actions";

export const metadata: Metadata = { title: "New bracket set" };

export default async function NewBracketSetPage() {
  const actor = await requirePagePermission("studio:use", "/studio/sets/new");
  const db = getDb();
  const [catalogue, sites, kits] = await Promise.all([listEclipses(db), listSites(db, actor), listKits(db, actor)]);
  const all = [...catalogue.featured, ...catalogue.past, ...catalogue.upcoming];
  // Photographs come from eclipses that have happened or are about to; featured ones first.
  const seen = new Set<string>();
  const eclipses = all
    .filter((e) => e.kind !== "partial" && !seen.has(e.id) && seen.add(e.id))
    .map((e) => ({ value: e.id, label: `${e.id} · ${e.kind}${e.name ? ` · ${e.name}` : ""}` }));
  const defaultEclipseId = catalogue.featured[0]?.id ?? eclipses[0]?.value ?? "";
  return (
    <>
      <PageTitle title="New bracket set" lead="One bracket set holds the frames of one camera at one eclipse: you add the frames on its page." />
      {sites.length === 0 ? (
        <EmptyState
          title="Add a site first"
          message="A bracket set needs the site it was taken from, so that the Sun's position and the image orientation can be computed."
          action={
            <Link href="/studio/sites/new" className="font-medium">
              Add a site
            </Link>
          }
        />
      ) : (
        <BracketSetForm
          action={createBracketSetAction}
          eclipses={eclipses}
          sites={sites.map((s) => ({ value: s.id, label: `${s.name}${s.kind === "moving" ? " (moving)" : ""}` }))}
          kits={kits.map((k) => ({ value: k.id, label: k.name }))}
          defaultEclipseId={defaultEclipseId}
        />
      )}
    </>
  );
}
