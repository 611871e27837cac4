"use client";
// Publish, withdraw (for the time being or for good, with a reason the public
// page shows) and restore. The server decides what is allowed; the buttons
// offered follow the plate's state so curators see only what can work.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Textarea } from "@/components/ui/textarea";
import type { PlateState, WithdrawalKind } from "@/db/schema/plates";
import { callApi, type ApiProblem } from "@/components/forms/call-api";

export interface PlateStateActionsProps {
  plateId: string;
  state: PlateState;
  withdrawnKind: WithdrawalKind | null;
  /** The bracket set's review state: publishing needs "approved". */
  setState: string;
}

export function PlateStateActions({ plateId, state, withdrawnKind, setState }: PlateStateActionsProps) {
  const router = useRouter();
  const [pending, setPending] = useState<string | null>(null);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [done, setDone] = useState<string | null>(null);

  async function run(what: string, url: string, body?: unknown, success = "Done.") {
    setPending(what);
    setProblem(null);
    setDone(null);
    const res = await callApi("POST", url, body);
    setPending(null);
    if (!res.ok) return setProblem(res.problem);
    setDone(success);
    router.refresh();
  }

  function withdraw(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const kind = (e.nativeEvent as SubmitEvent).submitter?.getAttribute("value") as WithdrawalKind;
    void run(`withdraw-${kind}`, `/api/review/plates/${plateId}/withdraw`, { reason: String(form.get("reason") ?? ""), kind }, kind === "temporary" ? "Withdrawn for the time being." : "Withdrawn for good.");
  }

  const canWithdraw = state === "published" || (state === "withdrawn" && withdrawnKind === "temporary");
  return (
    <div className="flex flex-col gap-4">
      {state === "draft" ? (
        <div className="flex flex-col gap-2">
          {setState !== "approved" ? <p className="text-sm">The bracket set is {setState}; it must be approved before this plate can be published.</p> : null}
          <div>
            <Button variant="primary" pending={pending === "publish"} pendingLabel="Publishing…" onClick={() => run("publish", `/api/review/plates/${plateId}/publish`, undefined, "Published.")}>
              Publish the plate
            </Button>
          </div>
        </div>
      ) : null}
      {state === "withdrawn" && withdrawnKind === "temporary" ? (
        <div>
          <Button variant="primary" pending={pending === "restore"} pendingLabel="Restoring…" onClick={() => run("restore", `/api/review/plates/${plateId}/restore`, undefined, "Back in the gallery.")}>
            Restore to the gallery
          </Button>
        </div>
      ) : null}
      {canWithdraw ? (
        <form onSubmit={withdraw} noValidate className="flex max-w-xl flex-col gap-3">
          <Field label="Reason for withdrawing" required hint="The public page shows it." error={problem?.fields.reason}>
            <Textarea name="reason" rows={2} maxLength={500} />
          </Field>
          <div className="flex flex-wrap gap-2">
            {state === "published" ? (
              <Button type="submit" name="kind" value="temporary" pending={pending === "withdraw-temporary"} pendingLabel="Withdrawing…">
                Withdraw while it is looked at
              </Button>
            ) : null}
            <Button type="submit" name="kind" value="permanent" variant="danger" pending={pending === "withdraw-permanent"} pendingLabel="Withdrawing…">
              Withdraw for good
            </Button>
          </div>
        </form>
      ) : null}
      {state === "withdrawn" && withdrawnKind === "permanent" ? <p className="text-sm">Withdrawn for good: the plate keeps its public record and takes no further changes.</p> : null}
      {problem ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {problem.message}
        </p>
      ) : null}
      {done ? (
        <p role="status" className="text-sm">
          {done}
        </p>
      ) : null}
    </div>
  );
}
