"use client";
// Sets or clears the edition's embargo date; the plates' desk pages show it.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { callApi, type ApiProblem } from "@/components/forms/call-api";

export function EmbargoForm({ editionId, embargoDate }: { editionId: string; embargoDate: string | null }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [done, setDone] = useState<string | null>(null);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const value = String(new FormData(e.currentTarget).get("embargoDate") ?? "");
    setPending(true);
    setProblem(null);
    setDone(null);
    const res = await callApi<{ embargoDate: string | null }>("PATCH", `/api/editions/${editionId}`, { embargoDate: value });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    setDone(res.data.embargoDate ? `Embargo until ${res.data.embargoDate}.` : "No embargo.");
    router.refresh();
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-wrap items-end gap-3">
      <Field label="Embargo until" hint="Empty for no embargo." error={problem?.fields.embargoDate ?? (problem && !Object.keys(problem.fields).length ? problem.message : undefined)}>
        <Input name="embargoDate" type="date" defaultValue={embargoDate ?? ""} />
      </Field>
      <Button type="submit" size="md" pending={pending} pendingLabel="Saving…">
        Save embargo
      </Button>
      {done ? (
        <p role="status" className="text-sm">
          {done}
        </p>
      ) : null}
    </form>
  );
}
