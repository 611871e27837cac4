"use server";
import { revalidatePath } from "next/cache";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { settingsSchema, updateSocietySettings } from "@/lib/society/settings";

export const saveSettingsAction = serverAction("settings:edit", settingsSchema, async (actor, input) => {
  const changed = await updateSocietySettings(getDb(), actor, input);
  revalidatePath("/", "layout");
  return changed.length ? `Saved: ${changed.length} setting${changed.length > 1 ? "s" : ""} changed.` : "Nothing changed.";
});
