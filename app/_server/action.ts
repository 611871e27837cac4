import "server-only";
import { unstable_rethrow } from "next/navigation";
import type { z } from "zod";
import type { Actor } from "@/lib/auth/actor";
import { requirePermission } from "@/lib/auth/actor";
import type { Action } from "@/lib/auth/permissions";
import { AppError, toErrorBody } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { currentActor } from "./actor";
import { markedFieldsMessage, type ActionResult } from "@/lib/http/action-result";

/**
 * The one wrapper for server actions: session and permission checked on the
 * server, FormData parsed with zod (coerce numbers: form fields are strings),
 * errors mapped to a message the form can show.
 */
export function serverAction<S extends z.ZodType>(
  action: Action,
  schema: S,
  run: (actor: Actor, input: z.infer<S>) => Promise<string>,
) {
  return async (_prev: ActionResult | null, form: FormData): Promise<ActionResult> => {
    const values = Object.fromEntries([...form.entries()].filter(([k, v]) => typeof v === "string" && !k.startsWith("$")).map(([k, v]) => [k, String(v)]));
    try {
      const actor = requirePermission(await currentActor(), action);
      const input = parseInput(schema, Object.fromEntries(form.entries()));
      return { ok: true, message: await run(actor, input) };
    } catch (err) {
      // redirect() and notFound() work by throwing; let Next.js handle them.
      unstable_rethrow(err);
      if (err instanceof AppError) {
        // Field problems are shown beside their fields, under the labels people read;
        // the summary only says how many there are.
        const message = err.fields.length > 0 ? markedFieldsMessage(err.fields.length) : err.message;
        return { ok: false, message, fields: err.fields, values };
      }
      const { body } = toErrorBody(err);
      return { ok: false, message: body.error.message, values };
    }
  };
}
