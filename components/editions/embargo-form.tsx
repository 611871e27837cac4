"use client";
// Sets or clears the edition's embargo date; the plates' desk pages show it.
import type { FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { fetchJson } from "@/lib/http/client-fetch";

export function EmbargoForm({ editionId, embargoDate }: { editionId: string; embargoDate: string | null }) {
  const save = useApiMutation((value: string) => fetchJson<{ embargoDate: string | null }>(`/api/editions/${editionId}`, { method: "PATCH", body: { embargoDate: value } }));

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    save.mutate(String(new FormData(e.currentTarget).get("embargoDate") ?? ""));
  }

  const problem = save.error;
  return (
    <form onSubmit={submit} noValidate className="flex flex-wrap items-end gap-3">
      {/* The one field carries any problem, the server's own sentence when it names no field. */}
      <Field label="Embargo until" hint="Empty for no embargo." error={problem ? (problem.fields.embargoDate ?? (problem.hasFields ? undefined : problem.message)) : undefined}>
        <Input name="embargoDate" type="date" defaultValue={embargoDate ?? ""} />
      </Field>
      <ScriptSubmitButton size="md" pending={save.isPending} pendingLabel="Saving…">
        Save embargo
      </ScriptSubmitButton>
      <Feedback success={save.data ? (save.data.embargoDate ? `Embargo until ${save.data.embargoDate}.` : "No embargo.") : null} />
    </form>
  );
}
