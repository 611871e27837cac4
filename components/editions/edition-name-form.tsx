"use client";
// Title, kind and issue label of an edition. Allowed in any state: it only
// names the edition, so an exported one can still have a typo put right.
import type { FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { formStrings } from "@/components/forms/form-values";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { fetchJson } from "@/lib/http/client-fetch";
import { EDITION_KIND_OPTIONS } from "./edition-kinds";

export interface EditionNameFormProps {
  editionId: string;
  title: string;
  kind: string;
  issueLabel: string;
}

export function EditionNameForm(props: EditionNameFormProps) {
  const save = useApiMutation((body: Record<string, string>) => fetchJson<{ title: string; changed: boolean }>(`/api/editions/${props.editionId}/name`, { method: "PATCH", body }));

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    save.mutate(formStrings(new FormData(e.currentTarget), ["title", "kind", "issueLabel"]));
  }

  const problem = save.error;
  return (
    <form onSubmit={submit} noValidate aria-label="Name of the edition" className="flex max-w-xl flex-col gap-4">
      <Field label="Title" required error={problem?.fields.title}>
        <Input name="title" maxLength={200} defaultValue={props.title} />
      </Field>
      <Field label="Kind" required error={problem?.fields.kind}>
        <Select name="kind" defaultValue={props.kind} options={EDITION_KIND_OPTIONS} />
      </Field>
      <Field label="Issue label" hint="As printed, such as “No. 41” or “Vol. 12, issue 3”. Empty for none." error={problem?.fields.issueLabel}>
        <Input name="issueLabel" maxLength={80} defaultValue={props.issueLabel} />
      </Field>
      <Feedback problem={problem} summarizeFields />
      <div className="flex flex-wrap items-center gap-3">
        <ScriptSubmitButton pending={save.isPending} pendingLabel="Saving…">
          Save name
        </ScriptSubmitButton>
        <Feedback
          live
          success={save.data ? (save.data.changed ? `Saved: the edition is now called “${save.data.title}”.` : "Nothing to save: the name is unchanged.") : null}
        />
      </div>
    </form>
  );
}
