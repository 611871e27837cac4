"use client";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { ApiError, callApi } from "@/components/bracket-sets/api-client";
import { FormMessage } from "@/components/auth/form-message";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Textarea } from "@/components/ui/textarea";

/** Adds a private note for the other curators, without a decision. */
export function NoteForm({ setId }: { setId: string }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [result, setResult] = useState<{ ok: boolean; text: string; field?: string } | null>(null);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const formEl = e.currentTarget;
    setPending(true);
    setResult(null);
    try {
      await callApi(`/api/review/sets/${setId}/notes`, { body: { body: String(new FormData(formEl).get("body") ?? "") } });
      setResult({ ok: true, text: "Note kept." });
      formEl.reset();
      router.refresh();
    } catch (err) {
      setResult({ ok: false, text: (err as Error).message, field: err instanceof ApiError ? err.fields.find((f) => f.field === "body")?.message : undefined });
    } finally {
      setPending(false);
    }
  }
  return (
    <form onSubmit={(e) => void submit(e)} className="flex max-w-2xl flex-col gap-3" noValidate>
      {result ? <FormMessage tone={result.ok ? "ok" : "danger"}>{result.text}</FormMessage> : null}
      <Field label="New private note" hint="Only curators read it." error={result?.field} required>
        <Textarea name="body" rows={3} maxLength={4000} />
      </Field>
      <div>
        <Button type="submit" size="sm" pending={pending} pendingLabel="Saving…">
          Keep note
        </Button>
      </div>
    </form>
  );
}
