"use client";
// The curator's decision on one set. Only the actions the state machine
// allows from the set's state are offered; the server checks again.
import { useRef, useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import { fetchJson } from "@/lib/http/client-fetch";
import { ACTION_LABELS, TRANSITIONS, type CuratorAction } from "@/lib/review/state-machine";

export interface ReasonOption {
  value: string;
  label: string;
}

const ACTION_HINT: Record<CuratorAction, string> = {
  "request-changes": "The set goes back to the photographer, who can correct it and send it again.",
  approve: "The set is ready for a plate.",
  reject: "The set will not become a plate. The photographer keeps their frames and reductions.",
  reopen: "Takes back the last decision: the set is awaiting review again.",
};

export function DecisionForm({
  setId,
  actions,
  changeReasons,
  rejectionReasons,
}: {
  setId: string;
  /** The actions open from the set's state, first one preselected. */
  actions: CuratorAction[];
  changeReasons: ReasonOption[];
  rejectionReasons: ReasonOption[];
}) {
  const [chosen, setAction] = useState<CuratorAction>(actions[0]);
  // After a decision the page offers other actions; fall back to the first one open.
  const action = actions.includes(chosen) ? chosen : actions[0];
  const formRef = useRef<HTMLFormElement>(null);
  const decide = useApiMutation((body: { action: CuratorAction; reasonCode?: string; message?: string; note?: string }) => fetchJson(`/api/review/sets/${setId}/decisions`, { body }), {
    onSuccess: () => formRef.current?.reset(),
  });
  const fields = decide.error?.fields;
  const reasons = action === "request-changes" ? changeReasons : action === "reject" ? rejectionReasons : [];
  const requires = TRANSITIONS[action].requires as readonly string[];

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const text = (k: string) => String(form.get(k) ?? "").trim() || undefined;
    decide.mutate({ action, reasonCode: text("reasonCode"), message: text("message"), note: text("note") });
  }

  const decided = decide.variables?.action;
  return (
    <form ref={formRef} onSubmit={submit} className="flex max-w-2xl flex-col gap-5" noValidate>
      <Feedback look="box" problem={decide.error} success={decide.isSuccess && decided ? `Done: ${ACTION_LABELS[decided]}. The photographer has been told by e-mail.` : null} />
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-semibold">Decision</legend>
        {actions.map((a) => (
          <label key={a} className="flex items-start gap-3">
            <input type="radio" name="action" value={a} checked={action === a} onChange={() => setAction(a)} className="mt-1 size-5 accent-accent" />
            <span>
              <span className="font-medium">{ACTION_LABELS[a][0].toUpperCase() + ACTION_LABELS[a].slice(1)}</span>
              <span className="block text-sm text-ink-muted">{ACTION_HINT[a]}</span>
            </span>
          </label>
        ))}
      </fieldset>
      {reasons.length ? (
        <Field label="Reason" error={fields?.reasonCode} required>
          <Select key={action} name="reasonCode" placeholder="Choose a reason" options={reasons} required defaultValue="" />
        </Field>
      ) : null}
      {action !== "reopen" ? (
        <Field
          label="Message to the photographer"
          hint="Sent by e-mail and shown on their set's page."
          error={fields?.message}
          required={requires.includes("message")}
        >
          <Textarea name="message" rows={4} maxLength={4000} />
        </Field>
      ) : null}
      <Field
        label={action === "reopen" ? "Why the decision is taken back (private)" : "Private note for curators"}
        hint="Only curators read it; it is never shown or sent to the photographer."
        error={fields?.note}
        required={requires.includes("note")}
      >
        <Textarea name="note" rows={3} maxLength={4000} />
      </Field>
      <div>
        <ScriptSubmitButton variant={action === "reject" ? "danger" : "primary"} pending={decide.isPending} pendingLabel="Saving…">
          {ACTION_LABELS[action][0].toUpperCase() + ACTION_LABELS[action].slice(1)}
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
