"use client";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import type { FormAction } from "@/lib/http/action-result";
import { useConfirmedAction } from "@/components/forms/use-confirmed-action";

/**
 * One role of one person as a toggle button (aria-pressed). Pressing it asks
 * for confirmation in a dialog that says what the change does; confirming
 * submits the server action, which checks again (an admin cannot revoke their
 * own admin role). The result replaces any earlier notice in the toast region.
 */
export function RoleSwitch({
  action,
  userId,
  role,
  label,
  held,
  personName,
  lockedReason,
}: {
  action: FormAction;
  userId: string;
  role: string;
  label: string;
  held: boolean;
  personName: string;
  /** Set when the switch must not be used (your own admin role), with the reason shown beside it. */
  lockedReason?: string;
}) {
  const { asking, setAsking, formAction, pending, toast } = useConfirmedAction(action);
  const verb = held ? "Revoke" : "Grant";
  return (
    <>
      <Button
        size="sm"
        variant={held ? "primary" : "secondary"}
        aria-pressed={held}
        aria-disabled={lockedReason ? true : undefined}
        title={lockedReason}
        onClick={() => (lockedReason ? toast.notify(lockedReason, { tone: "warn" }) : setAsking(true))}
        aria-label={`${label} role for ${personName}: ${held ? "held" : "not held"}${lockedReason ? ` (${lockedReason})` : held ? ", press to revoke" : ", press to grant"}`}
      >
        {label}
      </Button>
      <Dialog
        open={asking}
        onClose={() => setAsking(false)}
        title={`${verb} the ${label.toLowerCase()} role ${held ? "from" : "to"} ${personName}?`}
        description={held ? `${personName} loses what the ${label.toLowerCase()} role allows from their next page.` : `${personName} gains what the ${label.toLowerCase()} role allows from their next page.`}
        actions={
          <form action={formAction} className="flex flex-wrap justify-end gap-3">
            <input type="hidden" name="userId" value={userId} />
            <input type="hidden" name="role" value={role} />
            <input type="hidden" name="grant" value={held ? "false" : "true"} />
            <input type="hidden" name="personName" value={personName} />
            <Button variant="secondary" onClick={() => setAsking(false)}>
              Cancel
            </Button>
            <Button type="submit" variant={held ? "danger" : "primary"} pending={pending} pendingLabel={held ? "Revoking…" : "Granting…"}>
              {verb} {label.toLowerCase()}
            </Button>
          </form>
        }
      />
    </>
  );
}
