"use client";
import { useActionState, useEffect } from "react";
import { Button } from "@/components/ui/button";
import { useToast } from "@/components/ui/use-toast";
import type { FormAction } from "@/components/forms/action-result";


/**
 * One role of one person as a toggle button (aria-pressed), submitting a
 * server action; the result is announced through the toast region.
 */
export function RoleSwitch({
  action,
  userId,
  role,
  label,
  held,
  personName,
}: {
  action: FormAction;
  userId: string;
  role: string;
  label: string;
  held: boolean;
  personName: string;
}) {
  const [state, formAction, pending] = useActionState(action, null);
  const toast = useToast();
  useEffect(() => {
    if (state) toast.notify(state.message, { tone: state.ok ? "ok" : "danger" });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state]);
  return (
    <form action={formAction}>
      <input type="hidden" name="userId" value={userId} />
      <input type="hidden" name="role" value={role} />
      <input type="hidden" name="grant" value={held ? "false" : "true"} />
      <Button
        type="submit"
        size="sm"
        variant={held ? "primary" : "secondary"}
        aria-pressed={held}
        pending={pending}
        aria-label={`${label} role for ${personName}: ${held ? "held, press to revoke" : "not held, press to grant"}`}
      >
        {label}
      </Button>
    </form>
  );
}
