"use client";
import { useActionState, useState } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import type { FormAction } from "@/lib/http/action-result";


/** Delete with a confirmation dialog; the server checks ownership again. */
export function ConfirmDelete({
  id,
  name,
  thing,
  consequence,
  action,
}: {
  id: string;
  name: string;
  /** "kit", "site": used in the button label. */
  thing: string;
  consequence: string;
  action: FormAction;
}) {
  const [open, setOpen] = useState(false);
  const [state, formAction, pending] = useActionState(action, null);
  return (
    <>
      <Feedback look="box" problem={state && !state.ok ? state.message : null} />
      <Button variant="danger" onClick={() => setOpen(true)}>
        Delete {thing}
      </Button>
      <Dialog
        open={open}
        onClose={() => setOpen(false)}
        title={`Delete “${name}”?`}
        description={`${consequence} This cannot be undone.`}
        actions={
          <form action={formAction} className="flex gap-3">
            <input type="hidden" name="id" value={id} />
            <Button variant="secondary" onClick={() => setOpen(false)}>
              Keep it
            </Button>
            <Button type="submit" variant="danger" pending={pending}>
              Delete
            </Button>
          </form>
        }
      />
    </>
  );
}
