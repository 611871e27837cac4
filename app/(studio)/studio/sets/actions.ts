"use server";
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { createBracketSet, createBracketSetSchema } from "@/lib/bracket-sets";

export const createBracketSetAction = serverAction("studio:use", createBracketSetSchema, async (actor, input) => {
  const set = await createBracketSet(getDb(), actor, input);
  revalidatePath("/studio");
  redirect(`/studio/sets/${set.id}`);
});
