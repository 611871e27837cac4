import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { Feedback } from "@/components/ui/feedback";
import { ConfirmDelete } from "@/components/forms/confirm-delete";
import { KitForm } from "@/components/kits/kit-form";
import { KitOptics } from "@/components/kits/kit-optics";
import { PageTitle } from "@/components/page-title";
import { SolarSafetyNote } from "@/components/safety/solar-safety-note";
import { getDb } from "@/db/client";
import { findKit } from "@/lib/kits/kits";
import { deleteKitAction, updateKitAction } from "../actions";

export const metadata: Metadata = { title: "Kit" };

export default async function KitPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ saved?: string }> }) {
  const { id } = await params;
  const { saved } = await searchParams;
  const actor = await requirePagePermission("studio:use", `/studio/kits/${id}`);
  const kit = await foundOr404(findKit(getDb(), actor, id));
  return (
    <>
      <PageTitle title={kit.name} lead={kit.camera}>
        <Link href="/studio/kits">All kits</Link>
      </PageTitle>
      <Feedback look="box" success={saved ? "Kit saved." : null} />
      <KitOptics kit={kit} />
      <SolarSafetyNote className="my-8" />
      <section aria-labelledby="edit-kit" className="mt-8">
        <h2 id="edit-kit" className="mb-4 text-xl font-semibold">
          Edit
        </h2>
        <KitForm action={updateKitAction} submitLabel="Save changes" initial={kit} />
      </section>
      <section aria-labelledby="delete-kit" className="mt-10 border-t border-line pt-6">
        <h2 id="delete-kit" className="mb-3 text-xl font-semibold">
          Delete
        </h2>
        <ConfirmDelete id={kit.id} name={kit.name} thing="kit" consequence="Plans that used this kit keep their other settings." action={deleteKitAction} />
      </section>
    </>
  );
}
