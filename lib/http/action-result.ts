// What a server action answers and what the form that called it receives. The
// server (app/_server/action.ts) builds it and client components read it, so it
// lives here, where both may import it without pulling in the other's code.
import type { FieldProblem } from "@/lib/errors";

/** What every server action answers; forms show the message and the field errors. */
export interface ActionResult {
  ok: boolean;
  message: string;
  fields?: Pick<FieldProblem, "field" | "message">[];
  /**
   * What was submitted, on failure: React resets a form after its action
   * returns, so the form shows these again instead of losing the person's typing.
   */
  values?: Record<string, string>;
}

/** A server action as forms receive it (the second argument of useActionState). */
export type FormAction = (prev: ActionResult | null, form: FormData) => Promise<ActionResult>;

/** The summary above a form whose problems are shown beside their fields. */
export function markedFieldsMessage(count: number): string {
  return `Please correct ${count === 1 ? "the marked field" : `the ${count} marked fields`}.`;
}
