"use client";
// The way into the plate desk: on the review page, choose one of the set's
// finished reductions and its renditions; on a composite's page, its
// renditions. Makes a draft plate and opens its editor.
import { useRouter } from "next/navigation";
import type { FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { fetchJson } from "@/lib/http/client-fetch";
import { RenditionsPicker } from "./renditions-picker";

export interface MakePlateReduction {
  id: string;
  /** What the curator recognises it by, e.g. "MGN, registered on the Sun, 2027-08-02 10:41". */
  label: string;
  state: string;
}

export interface MakePlateButtonProps {
  setId?: string;
  reductions?: MakePlateReduction[];
  /** A finished composite to show instead of one of a set's reductions. */
  compositeId?: string;
}

export function MakePlateButton({ setId, reductions = [], compositeId }: MakePlateButtonProps) {
  const router = useRouter();
  const finished = reductions.filter((r) => r.state === "done");
  const make = useApiMutation((body: Record<string, unknown>) => fetchJson<{ id: string }>("/api/review/plates", { body }), {
    refresh: false,
    onSuccess: (plate) => router.push(`/review/plates/${plate.id}`),
  });
  const problem = make.error;

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const source = compositeId ? { compositeId } : { reductionId: String(form.get("reductionId") ?? "") };
    make.mutate({ ...source, renditions: form.getAll("renditions").map(String) });
  }

  if (!compositeId && finished.length === 0) return <p className="text-sm text-ink-muted">No reduction of this set has finished, so no plate can be made yet.</p>;
  return (
    <form onSubmit={submit} noValidate className="flex max-w-xl flex-col gap-3" data-set-id={setId}>
      {compositeId ? null : (
        <Field label="Reduction to show" required error={problem?.fields.reductionId}>
          <Select name="reductionId" options={finished.map((r) => ({ value: r.id, label: r.label }))} />
        </Field>
      )}
      <RenditionsPicker legend="Renditions to show" error={problem?.fields.renditions} />
      <Feedback problem={problem} />
      <div>
        <ScriptSubmitButton variant="primary" pending={make.isPending} pendingLabel="Making the plate…">
          Make a plate
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
