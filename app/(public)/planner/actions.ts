"use server";
import { revalidatePath } from "next/cache";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { savePlan, savePlanSchema } from "@/lib/planner/saved-plans";

export const savePlanAction = serverAction("studio:use", savePlanSchema, async (actor, input) => {
  const plan = await savePlan(getDb(), actor, input);
  revalidatePath("/planner");
  return `Saved “${plan.name}”.`;
});
