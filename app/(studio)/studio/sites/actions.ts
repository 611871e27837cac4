"use server";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { createSite, deleteSite, siteEditSchema, siteInputSchema, updateSite, type SiteChange } from "@/lib/sites/sites";

export const createSiteAction = serverAction("studio:use", siteInputSchema, async (actor, input) => {
  const site = await createSite(getDb(), actor, input);
  revalidatePath("/studio/sites");
  redirect(`/studio/sites/${site.id}?saved=1`);
});

export const updateSiteAction = serverAction("studio:use", siteEditSchema, async (actor, edit) => {
  const { id, ...change } = edit;
  const site = await updateSite(getDb(), actor, id, change as SiteChange);
  revalidatePath("/studio/sites");
  redirect(`/studio/sites/${site.id}?saved=1`);
});

export const deleteSiteAction = serverAction("studio:use", z.object({ id: z.uuid() }), async (actor, { id }) => {
  await deleteSite(getDb(), actor, id);
  revalidatePath("/studio/sites");
  redirect("/studio/sites");
});
