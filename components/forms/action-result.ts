/** What every server action answers; forms show the message and the field errors. */
export interface ActionResult {
  ok: boolean;
  message: string;
  fields?: { field: string; message: string }[];
  /**
   * What was submitted, on failure: React resets a form after its action
   * returns, so the form shows these again instead of losing the person's typing.
   */
  values?: Record<string, string>;
}

/** A server action as forms receive it (the second argument of useActionState). */
export type FormAction = (prev: ActionResult | null, form: FormData) => Promise<ActionResult>;
