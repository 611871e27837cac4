"use client";
// The way into the plate desk: on the review page, choose one of the set's
// finished reductions and its renditions; on a composite's page, its
// renditions. Makes a draft plate and opens its editor.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { callApi, type ApiProblem } from "@/components/forms/call-api";
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
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setProblem(null);
    const source = compositeId ? { compositeId } : { reductionId: String(form.get("reductionId") ?? "") };
    const res = await callApi<{ id: string }>("POST", "/api/review/plates", { ...source, renditions: form.getAll("renditions").map(String) });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    router.push(`/review/plates/${res.data.id}`);
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
      {problem ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {problem.message}
        </p>
      ) : null}
      <div>
        <Button type="submit" variant="primary" pending={pending} pendingLabel="Making the plate…">
          Make a plate
        </Button>
      </div>
    </form>
  );
}
