"use server";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { createKit, deleteKit, kitInputSchema, updateKit } from "@/lib/kits/kits";

export const createKitAction = serverAction("studio:use", kitInputSchema, async (actor, input) => {
  const kit = await createKit(getDb(), actor, input);
  revalidatePath("/studio/kits");
  redirect(`/studio/kits/${kit.id}?saved=1`);
});

export const updateKitAction = serverAction("studio:use", kitInputSchema.extend({ id: z.uuid() }), async (actor, { id, ...input }) => {
  await updateKit(getDb(), actor, id, input);
  revalidatePath(`/studio/kits/${id}`);
  return "Kit saved.";
});

export const deleteKitAction = serverAction("studio:use", z.object({ id: z.uuid() }), async (actor, { id }) => {
  await deleteKit(getDb(), actor, id);
  revalidatePath("/studio/kits");
  redirect("/studio/kits");
});
