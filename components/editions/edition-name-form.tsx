"use client";
// Title, kind and issue label of an edition. Allowed in any state: it only
// names the edition, so an exported one can still have a typo put right.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { callApi, type ApiProblem } from "@/components/forms/call-api";

export interface EditionNameFormProps {
  editionId: string;
  title: string;
  kind: string;
  issueLabel: string;
}

export function EditionNameForm(props: EditionNameFormProps) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [done, setDone] = useState("");

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setProblem(null);
    setDone("");
    const res = await callApi<{ title: string; changed: boolean }>("PATCH", `/api/editions/${props.editionId}/name`, {
      title: String(form.get("title") ?? ""),
      kind: String(form.get("kind") ?? ""),
      issueLabel: String(form.get("issueLabel") ?? ""),
    });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    setDone(res.data.changed ? `Saved: the edition is now called “${res.data.title}”.` : "Nothing to save: the name is unchanged.");
    router.refresh();
  }

  const hasFieldErrors = problem !== null && Object.keys(problem.fields).length > 0;
  return (
    <form onSubmit={submit} noValidate aria-label="Name of the edition" className="flex max-w-xl flex-col gap-4">
      <Field label="Title" required error={problem?.fields.title}>
        <Input name="title" maxLength={200} defaultValue={props.title} />
      </Field>
      <Field label="Kind" required error={problem?.fields.kind}>
        <Select
          name="kind"
          defaultValue={props.kind}
          options={[
            { value: "newsletter", label: "Newsletter" },
            { value: "journal", label: "Journal" },
          ]}
        />
      </Field>
      <Field label="Issue label" hint="As printed, such as “No. 41” or “Vol. 12, issue 3”. Empty for none." error={problem?.fields.issueLabel}>
        <Input name="issueLabel" maxLength={80} defaultValue={props.issueLabel} />
      </Field>
      {problem ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {hasFieldErrors ? "Please correct the marked fields." : problem.message}
        </p>
      ) : null}
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" pending={pending} pendingLabel="Saving…">
          Save name
        </Button>
        {/* Present from the first render, so the polite announcement is heard. */}
        <p role="status" className="text-sm">
          {done}
        </p>
      </div>
    </form>
  );
}
