"use client";
// Publish, withdraw (for the time being or for good, with a reason the public
// page shows) and restore, each confirmed in a dialog that says what will
// happen (the photographer is told by e-mail) and repeats the licence warning
// where the plate carries a Creative Commons licence. The server decides what
// is allowed; the buttons offered follow the plate's state.
import { useRef, useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Dialog } from "@/components/ui/dialog";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Textarea } from "@/components/ui/textarea";
import type { PlateLicence, PlateState, WithdrawalKind } from "@/db/schema/plates";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";
import { licenceWarning } from "@/lib/plates/licences";
import { STATE_LABELS, type ReviewState } from "@/lib/review/state-machine";

export interface PlateStateActionsProps {
  plateId: string;
  title: string;
  state: PlateState;
  withdrawnKind: WithdrawalKind | null;
  licence: PlateLicence;
  photographer: string;
  /** The bracket set's review state: publishing needs "approved" (for a composite, the first of its sets that is not). */
  setState: ReviewState;
  /** A composite's plate shows several sets, each of which must be approved. */
  isComposite?: boolean;
}

type Move = { kind: "publish" } | { kind: "restore" } | { kind: "withdraw"; how: WithdrawalKind; reason: string };

const SUCCESS: Record<string, string> = {
  publish: "Published.",
  restore: "Back in the gallery.",
  "withdraw-temporary": "Withdrawn for the time being.",
  "withdraw-permanent": "Withdrawn for good.",
};

/** "The photographer has" or, for a composite's plate, "The photographers have" been told. */
const toldLine = (isComposite: boolean) => (isComposite ? " The photographers have been told by e-mail." : " The photographer has been told by e-mail.");

export function PlateStateActions({ plateId, title, state, withdrawnKind, licence, photographer, setState, isComposite = false }: PlateStateActionsProps) {
  const [asking, setAsking] = useState<Move | null>(null);
  // A withdrawal without its reason, caught before the dialog opens.
  const [missingReason, setMissingReason] = useState<ApiProblem | null>(null);
  const reasonRef = useRef<HTMLTextAreaElement>(null);
  const warning = licenceWarning(licence);
  const move = useApiMutation(
    (m: Move) =>
      m.kind === "withdraw"
        ? fetchJson(`/api/review/plates/${plateId}/withdraw`, { body: { reason: m.reason, kind: m.how } })
        : fetchJson(`/api/review/plates/${plateId}/${m.kind}`, { method: "POST" }),
    { onSuccess: () => setAsking(null), onError: () => setAsking(null) },
  );
  const pending = move.isPending;
  const problem = missingReason ?? move.error;
  const done = move.isSuccess && move.variables ? `${SUCCESS[move.variables.kind === "withdraw" ? `withdraw-${move.variables.how}` : move.variables.kind]}${toldLine(isComposite)}` : null;

  function run(m: Move) {
    setMissingReason(null);
    move.mutate(m);
  }

  function askWithdraw(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const how = (e.nativeEvent as SubmitEvent).submitter?.getAttribute("value") as WithdrawalKind;
    const reason = String(new FormData(e.currentTarget).get("reason") ?? "").trim();
    move.reset();
    if (!reason) {
      setMissingReason(ApiProblem.local("Give the reason for withdrawing: the public page shows it.", { reason: "Give the reason; the public page shows it." }));
      reasonRef.current?.focus();
      return;
    }
    setMissingReason(null);
    setAsking({ kind: "withdraw", how, reason });
  }

  const canWithdraw = state === "published" || (state === "withdrawn" && withdrawnKind === "temporary");
  const dialog = asking ? describeMove(asking, title, photographer) : null;
  return (
    <div className="flex flex-col gap-4">
      {state === "draft" ? (
        <div className="flex flex-col gap-2">
          {setState !== "approved" ? (
            <p className="text-sm">
              {isComposite
                ? `A bracket set in the composite is ${STATE_LABELS[setState]}; every one must be approved before this plate can be published.`
                : `The bracket set is ${STATE_LABELS[setState]}; it must be approved before this plate can be published.`}
            </p>
          ) : null}
          <div>
            <Button variant="primary" onClick={() => setAsking({ kind: "publish" })}>
              Publish the plate
            </Button>
          </div>
        </div>
      ) : null}
      {state === "withdrawn" && withdrawnKind === "temporary" ? (
        <div>
          <Button variant="primary" onClick={() => setAsking({ kind: "restore" })}>
            Restore to the gallery
          </Button>
        </div>
      ) : null}
      {canWithdraw ? (
        <form onSubmit={askWithdraw} noValidate className="flex max-w-xl flex-col gap-3">
          <Field label="Reason for withdrawing" required hint="The public page shows it." error={problem?.fields.reason}>
            <Textarea ref={reasonRef} name="reason" rows={2} maxLength={500} />
          </Field>
          <div className="flex flex-wrap gap-2">
            {state === "published" ? (
              <ScriptSubmitButton name="kind" value="temporary">
                Withdraw while it is looked at
              </ScriptSubmitButton>
            ) : null}
            <ScriptSubmitButton name="kind" value="permanent" variant="danger">
              Withdraw for good
            </ScriptSubmitButton>
          </div>
        </form>
      ) : null}
      {state === "withdrawn" && withdrawnKind === "permanent" ? <p className="text-sm">Withdrawn for good: the plate keeps its public record and takes no further changes.</p> : null}
      <Feedback problem={problem} success={done} />
      <Dialog
        open={asking !== null}
        onClose={() => setAsking(null)}
        title={dialog?.title ?? ""}
        description={dialog?.description}
        dismissOnBackdrop={!pending}
        actions={
          <>
            <Button variant="secondary" onClick={() => setAsking(null)} disabled={pending}>
              Cancel
            </Button>
            <Button variant={asking?.kind === "withdraw" && asking.how === "permanent" ? "danger" : "primary"} pending={pending} pendingLabel={dialog?.pendingLabel} onClick={() => asking && run(asking)}>
              {dialog?.confirm}
            </Button>
          </>
        }
      >
        {dialog ? (
          <div className="flex flex-col gap-3 text-sm">
            {asking?.kind === "withdraw" ? (
              <p>
                Reason the public page will show: <q>{asking.reason}</q>
              </p>
            ) : null}
            {warning ? (
              <p role="note" className="rounded-control border border-warn/50 bg-warn/10 p-3">
                {warning}
              </p>
            ) : null}
          </div>
        ) : null}
      </Dialog>
    </div>
  );
}

function describeMove(move: Move, title: string, photographer: string) {
  const told = `${photographer} will be told by e-mail.`;
  if (move.kind === "publish") {
    return { title: `Publish “${title}”?`, description: `The plate goes into the public gallery with its texts, credits and licence, and its link becomes permanent. ${told}`, confirm: "Publish", pendingLabel: "Publishing…" };
  }
  if (move.kind === "restore") {
    return { title: `Restore “${title}” to the gallery?`, description: `Its page and image are public again at once. ${told}`, confirm: "Restore", pendingLabel: "Restoring…" };
  }
  return move.how === "temporary"
    ? { title: `Withdraw “${title}” for the time being?`, description: `The image leaves the gallery; its page keeps the record and shows the reason. You can restore it later. ${told}`, confirm: "Withdraw", pendingLabel: "Withdrawing…" }
    : { title: `Withdraw “${title}” for good?`, description: `The image leaves the gallery for good; its page keeps the record and shows the reason. This cannot be undone. ${told}`, confirm: "Withdraw for good", pendingLabel: "Withdrawing…" };
}
