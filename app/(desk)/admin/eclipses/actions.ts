"use server";
import { revalidatePath } from "next/cache";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { editEclipse, eclipseEditSchema } from "@/lib/eclipses/eclipses";

export const editEclipseAction = serverAction("eclipses:edit", eclipseEditSchema, async (actor, input) => {
  const e = await editEclipse(getDb(), actor, input);
  revalidatePath("/eclipses");
  revalidatePath("/admin/eclipses");
  return `Saved ${e.id}${e.featured ? " (featured)" : ""}.`;
});
