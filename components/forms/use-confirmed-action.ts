"use client";
// A server action behind a confirmation dialog: `asking` opens the dialog, the
// dialog's form submits `formAction`, and the dialog closes when the server has
// answered. The answer shows as a notice (which replaces any earlier one).
import { useActionState, useEffect, useState } from "react";
import { useToast } from "@/components/ui/use-toast";
import type { ActionResult, FormAction } from "@/lib/http/action-result";

export function useConfirmedAction(action: FormAction) {
  const [asking, setAsking] = useState(false);
  const toast = useToast();
  const [state, formAction, pending] = useActionState<ActionResult | null, FormData>(async (prev, form) => {
    const result = await action(prev, form);
    setAsking(false);
    return result;
  }, null);
  useEffect(() => {
    if (state) toast.notify(state.message, { tone: state.ok ? "ok" : "danger" });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state]);
  return { asking, setAsking, formAction, pending, toast };
}
