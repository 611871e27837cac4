"use client";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import type { FormAction } from "@/lib/http/action-result";
import { useConfirmedAction } from "@/components/forms/use-confirmed-action";

/** Disable a person (no sign-in, sessions end) or enable them again, after a confirmation. */
export function DisablePerson({ action, userId, personName, disabled, isSelf }: { action: FormAction; userId: string; personName: string; disabled: boolean; isSelf: boolean }) {
  const { asking, setAsking, formAction, pending } = useConfirmedAction(action);
  if (isSelf) return <span className="text-sm text-ink-muted">your own account</span>;
  return (
    <>
      <Button size="sm" variant={disabled ? "secondary" : "quiet"} onClick={() => setAsking(true)} aria-label={`${disabled ? "Enable" : "Disable"} ${personName}`}>
        {disabled ? "Enable" : "Disable"}
      </Button>
      <Dialog
        open={asking}
        onClose={() => setAsking(false)}
        title={disabled ? `Let ${personName} sign in again?` : `Disable ${personName}?`}
        description={
          disabled
            ? "They can sign in with their password again; their roles are as they were."
            : "They are signed out everywhere at once and cannot sign in until an administrator enables them again. Their bracket sets, plates and roles are kept."
        }
        actions={
          <form action={formAction} className="flex flex-wrap justify-end gap-3">
            <input type="hidden" name="userId" value={userId} />
            <input type="hidden" name="disabled" value={disabled ? "false" : "true"} />
            <input type="hidden" name="personName" value={personName} />
            <Button variant="secondary" onClick={() => setAsking(false)}>
              Cancel
            </Button>
            <Button type="submit" variant={disabled ? "primary" : "danger"} pending={pending} pendingLabel={disabled ? "Enabling…" : "Disabling…"}>
              {disabled ? "Enable" : "Disable"}
            </Button>
          </form>
        }
      />
    </>
  );
}
