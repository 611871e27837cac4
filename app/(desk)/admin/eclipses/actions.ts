"use server";
import { revalidatePath } from "next/cache";
import { unstable_rethrow } from "next/navigation";
import { currentActor } from "@/app/_server/actor";
import type { ActionResult } from "@/lib/http/action-result";
import { getDb } from "@/db/client";
import { requirePermission } from "@/lib/auth/actor";
import { editEclipseCatalogue } from "@/lib/eclipses/eclipses";
import { AppError, toErrorBody } from "@/lib/errors";

/**
 * The catalogue's one save: every row's name and featured flag at once. Its
 * fields are named per eclipse (name:<id>), so it cannot use the one-schema
 * serverAction wrapper; it keeps the wrapper's rules (permission on the
 * server, field problems beside their fields, nothing leaked).
 */
export async function saveCatalogueAction(_prev: ActionResult | null, form: FormData): Promise<ActionResult> {
  const values = Object.fromEntries([...form.entries()].filter(([k, v]) => typeof v === "string" && !k.startsWith("$")).map(([k, v]) => [k, String(v)]));
  try {
    const actor = requirePermission(await currentActor(), "eclipses:edit");
    const changed = await editEclipseCatalogue(getDb(), actor, values);
    revalidatePath("/eclipses");
    revalidatePath("/admin/eclipses");
    return { ok: true, message: changed.length === 0 ? "Nothing had changed." : `Saved ${changed.length} change${changed.length === 1 ? "" : "s"}.` };
  } catch (err) {
    unstable_rethrow(err);
    if (err instanceof AppError) return { ok: false, message: err.message, fields: err.fields, values };
    return { ok: false, message: toErrorBody(err).body.error.message, values };
  }
}
