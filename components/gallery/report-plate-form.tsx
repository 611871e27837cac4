"use client";
// "Report this plate": a visitor without an account tells the curators about a
// rights question, an error or something else. Closed by default, so the plate
// page stays about the plate; the server checks everything again.
import { useId, useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import { callApi, type ApiProblem } from "@/components/forms/call-api";

const KINDS = [
  { value: "rights", label: "A rights question (who made it, who may use it)" },
  { value: "error", label: "An error (wrong caption, credit, site, time)" },
  { value: "other", label: "Something else" },
];

export function ReportPlateForm({ slug, title }: { slug: string; title: string }) {
  const headingId = useId();
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [sent, setSent] = useState(false);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setProblem(null);
    const res = await callApi("POST", `/api/plates/${encodeURIComponent(slug)}/reports`, {
      kind: String(form.get("kind") ?? ""),
      message: String(form.get("message") ?? ""),
      email: String(form.get("email") ?? ""),
    });
    setPending(false);
    if (res.ok) setSent(true);
    else setProblem(res.problem);
  }

  return (
    <section aria-labelledby={headingId} className="border-t border-line pt-6">
      <h2 id={headingId} className="text-lg font-semibold">
        Report this plate
      </h2>
      <details className="mt-2">
        <summary className="cursor-pointer text-sm font-medium">Tell the curators about a rights question or an error</summary>
        {sent ? (
          <p role="status" className="mt-4 max-w-prose text-sm">
            Thank you. The curators have your report on “{title}” and will answer at the address you gave.
          </p>
        ) : (
          <form onSubmit={submit} noValidate className="mt-4 flex max-w-xl flex-col gap-4">
            <p className="text-sm text-ink-muted">The curators read every report. We use your address only to answer you.</p>
            <Field label="What is it about?" required error={problem?.fields.kind}>
              <Select name="kind" options={KINDS} defaultValue="error" required />
            </Field>
            <Field label="Your message" required hint="At least 10 characters." error={problem?.fields.message}>
              <Textarea name="message" rows={5} required minLength={10} maxLength={4000} />
            </Field>
            <Field label="Your e-mail address" required error={problem?.fields.email}>
              <Input name="email" type="email" autoComplete="email" required />
            </Field>
            {problem ? (
              <p role="alert" className="text-sm font-medium text-danger">
                {problem.message}
              </p>
            ) : null}
            <div>
              <Button type="submit" variant="secondary" pending={pending} pendingLabel="Sending…">
                Send the report
              </Button>
            </div>
          </form>
        )}
      </details>
    </section>
  );
}
