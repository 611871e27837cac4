"use client";
import { useRef, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Textarea } from "@/components/ui/textarea";
import { fetchJson } from "@/lib/http/client-fetch";

/** Adds a private note for the other curators, without a decision. */
export function NoteForm({ setId }: { setId: string }) {
  const formRef = useRef<HTMLFormElement>(null);
  const keep = useApiMutation((text: string) => fetchJson(`/api/review/sets/${setId}/notes`, { body: { body: text } }), {
    onSuccess: () => formRef.current?.reset(),
  });

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    keep.mutate(String(new FormData(e.currentTarget).get("body") ?? ""));
  }
  return (
    <form ref={formRef} onSubmit={submit} className="flex max-w-2xl flex-col gap-3" noValidate>
      <Feedback look="box" problem={keep.error} success={keep.isSuccess ? "Note kept." : null} />
      <Field label="New private note" hint="Only curators read it." error={keep.error?.fields.body} required>
        <Textarea name="body" rows={3} maxLength={4000} />
      </Field>
      <div>
        <ScriptSubmitButton size="sm" pending={keep.isPending} pendingLabel="Saving…">
          Keep note
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
