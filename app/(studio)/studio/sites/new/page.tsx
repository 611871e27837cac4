import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { SiteForm } from "@/components/sites/site-form";
import { createSiteAction } from "../actions";

export const metadata: Metadata = { title: "New site" };

export default async function NewSitePage() {
  await requirePagePermission("studio:use", "/studio/sites/new");
  return (
    <>
      <PageTitle title="New site" lead="Where you will observe from. Public pages honour the precision you choose." />
      <SiteForm action={createSiteAction} />
    </>
  );
}
