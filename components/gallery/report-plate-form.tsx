"use client";
// "Report this plate": a visitor without an account tells the curators about a
// rights question, an error or something else. Closed by default, so the plate
// page stays about the plate; the server checks everything again.
import { useId, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { formStrings } from "@/components/forms/form-values";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import { fetchJson } from "@/lib/http/client-fetch";

const KINDS = [
  { value: "rights", label: "A rights question (who made it, who may use it)" },
  { value: "error", label: "An error (wrong caption, credit, site, time)" },
  { value: "other", label: "Something else" },
];

export function ReportPlateForm({ slug, title }: { slug: string; title: string }) {
  const headingId = useId();
  // The public page has nothing to read again after a report.
  const report = useApiMutation((body: Record<string, string>) => fetchJson(`/api/plates/${encodeURIComponent(slug)}/reports`, { body }), { refresh: false });
  const problem = report.error;

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    report.mutate(formStrings(new FormData(e.currentTarget), ["kind", "message", "email"]));
  }

  return (
    <section aria-labelledby={headingId} className="border-t border-line pt-6">
      <h2 id={headingId} className="text-lg font-semibold">
        Report this plate
      </h2>
      <details className="mt-2">
        <summary className="cursor-pointer text-sm font-medium">Tell the curators about a rights question or an error</summary>
        {report.isSuccess ? (
          <Feedback className="mt-4 max-w-prose" success={`Thank you. The curators have your report on “${title}” and will answer at the address you gave.`} />
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
            <Feedback problem={problem} />
            <div>
              <ScriptSubmitButton variant="secondary" pending={report.isPending} pendingLabel="Sending…">
                Send the report
              </ScriptSubmitButton>
            </div>
          </form>
        )}
      </details>
    </section>
  );
}
