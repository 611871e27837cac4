"use client";
// Starts an edition: title, newsletter or journal, issue label, optional embargo date.
import { useRouter } from "next/navigation";
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

export function NewEditionForm() {
  const router = useRouter();
  const start = useApiMutation((body: Record<string, string>) => fetchJson<{ id: string }>("/api/editions", { body }), {
    refresh: false,
    onSuccess: (data) => router.push(`/editions/${data.id}`),
  });

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    start.mutate(formStrings(new FormData(e.currentTarget), ["title", "kind", "issueLabel", "embargoDate"]));
  }

  const problem = start.error;
  return (
    <form onSubmit={submit} noValidate className="flex max-w-xl flex-col gap-4">
      <Field label="Title" required error={problem?.fields.title}>
        <Input name="title" maxLength={200} placeholder="Kestrel Ridge Bulletin, autumn 2027" />
      </Field>
      <Field label="Kind" required error={problem?.fields.kind}>
        <Select name="kind" defaultValue="newsletter" options={EDITION_KIND_OPTIONS} />
      </Field>
      <Field label="Issue label" hint="As printed, such as “No. 41” or “Vol. 12, issue 3”." error={problem?.fields.issueLabel}>
        <Input name="issueLabel" maxLength={80} />
      </Field>
      <Field label="Embargo until" hint="Optional. The plates' desk pages show it." error={problem?.fields.embargoDate}>
        <Input name="embargoDate" type="date" />
      </Field>
      <Feedback problem={problem} summarizeFields />
      <div>
        <ScriptSubmitButton variant="primary" pending={start.isPending} pendingLabel="Starting…">
          Start the edition
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
