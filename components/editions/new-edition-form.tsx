"use client";
// Starts an edition: title, newsletter or journal, issue label, optional embargo date.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { callApi, type ApiProblem } from "@/components/forms/call-api";

export function NewEditionForm() {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setProblem(null);
    const res = await callApi<{ id: string }>("POST", "/api/editions", {
      title: String(form.get("title") ?? ""),
      kind: String(form.get("kind") ?? ""),
      issueLabel: String(form.get("issueLabel") ?? ""),
      embargoDate: String(form.get("embargoDate") ?? ""),
    });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    router.push(`/editions/${res.data.id}`);
  }

  return (
    <form onSubmit={submit} noValidate className="flex max-w-xl flex-col gap-4">
      <Field label="Title" required error={problem?.fields.title}>
        <Input name="title" maxLength={200} placeholder="Kestrel Ridge Bulletin, autumn 2027" />
      </Field>
      <Field label="Kind" required error={problem?.fields.kind}>
        <Select
          name="kind"
          defaultValue="newsletter"
          options={[
            { value: "newsletter", label: "Newsletter" },
            { value: "journal", label: "Journal" },
          ]}
        />
      </Field>
      <Field label="Issue label" hint="As printed, such as “No. 41” or “Vol. 12, issue 3”." error={problem?.fields.issueLabel}>
        <Input name="issueLabel" maxLength={80} />
      </Field>
      <Field label="Embargo until" hint="Optional. The plates' desk pages show it." error={problem?.fields.embargoDate}>
        <Input name="embargoDate" type="date" />
      </Field>
      {problem ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {problem.fields && Object.keys(problem.fields).length ? "Please correct the marked fields." : problem.message}
        </p>
      ) : null}
      <div>
        <Button type="submit" variant="primary" pending={pending} pendingLabel="Starting…">
          Start the edition
        </Button>
      </div>
    </form>
  );
}
