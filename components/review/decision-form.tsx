"use client";
// The curator's decision on one set. Only the actions the state machine
// allows from the set's state are offered; the server checks again.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { ApiError, callApi } from "@/components/bracket-sets/api-client";
import { FormMessage } from "@/components/auth/form-message";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
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
  const router = useRouter();
  const [chosen, setAction] = useState<CuratorAction>(actions[0]);
  // After a decision the page offers other actions; fall back to the first one open.
  const action = actions.includes(chosen) ? chosen : actions[0];
  const [pending, setPending] = useState(false);
  const [result, setResult] = useState<{ ok: boolean; text: string; fields: Record<string, string> } | null>(null);
  const reasons = action === "request-changes" ? changeReasons : action === "reject" ? rejectionReasons : [];
  const requires = TRANSITIONS[action].requires as readonly string[];

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const formEl = e.currentTarget;
    const form = new FormData(formEl);
    const text = (k: string) => String(form.get(k) ?? "").trim() || undefined;
    setPending(true);
    setResult(null);
    try {
      await callApi(`/api/review/sets/${setId}/decisions`, { body: { action, reasonCode: text("reasonCode"), message: text("message"), note: text("note") } });
      setResult({ ok: true, text: `Done: ${ACTION_LABELS[action]}. The photographer has been told by e-mail.`, fields: {} });
      formEl.reset();
      router.refresh();
    } catch (err) {
      const fields = err instanceof ApiError ? Object.fromEntries(err.fields.map((f) => [f.field, f.message])) : {};
      setResult({ ok: false, text: (err as Error).message, fields });
    } finally {
      setPending(false);
    }
  }

  return (
    <form onSubmit={(e) => void submit(e)} className="flex max-w-2xl flex-col gap-5" noValidate>
      {result ? <FormMessage tone={result.ok ? "ok" : "danger"}>{result.text}</FormMessage> : null}
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
        <Field label="Reason" error={result?.fields.reasonCode} required>
          <Select key={action} name="reasonCode" placeholder="Choose a reason" options={reasons} required defaultValue="" />
        </Field>
      ) : null}
      {action !== "reopen" ? (
        <Field
          label="Message to the photographer"
          hint="Sent by e-mail and shown on their set's page."
          error={result?.fields.message}
          required={requires.includes("message")}
        >
          <Textarea name="message" rows={4} maxLength={4000} />
        </Field>
      ) : null}
      <Field
        label={action === "reopen" ? "Why the decision is taken back (private)" : "Private note for curators"}
        hint="Only curators read it; it is never shown or sent to the photographer."
        error={result?.fields.note}
        required={requires.includes("note")}
      >
        <Textarea name="note" rows={3} maxLength={4000} />
      </Field>
      <div>
        <Button type="submit" variant={action === "reject" ? "danger" : "primary"} pending={pending} pendingLabel="Saving…">
          {ACTION_LABELS[action][0].toUpperCase() + ACTION_LABELS[action].slice(1)}
        </Button>
      </div>
    </form>
  );
}
