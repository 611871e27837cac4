"use client";
// Reports from the public on one plate, open first, each with its answer form.
import type { FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Badge } from "@/components/ui/badge";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Textarea } from "@/components/ui/textarea";
import { formatDate, formatDateTime } from "@/lib/format/dates";
import { fetchJson } from "@/lib/http/client-fetch";
import type { PlateReportDto } from "@/lib/plates/reports";

const KIND_LABEL = { rights: "Rights", error: "Error", other: "Other" } as const;

function AnswerForm({ plateId, reportId }: { plateId: string; reportId: string }) {
  const send = useApiMutation((body: { answer: string; close: boolean }) => fetchJson(`/api/review/plates/${plateId}/reports/${reportId}/answer`, { body }));

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    send.mutate({ answer: String(form.get("answer") ?? ""), close: form.get("close") === "on" });
  }

  return (
    <form onSubmit={submit} noValidate className="mt-3 flex flex-col gap-2">
      <Field label="Answer to the reporter (sent by e-mail)" required error={send.error?.fields.answer}>
        <Textarea name="answer" rows={3} maxLength={4000} />
      </Field>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" name="close" defaultChecked /> Close the report with this answer
      </label>
      <Feedback problem={send.error} />
      <div>
        <ScriptSubmitButton size="sm" pending={send.isPending} pendingLabel="Sending…">
          Send the answer
        </ScriptSubmitButton>
      </div>
    </form>
  );
}

export function PlateReports({ plateId, reports }: { plateId: string; reports: PlateReportDto[] }) {
  if (reports.length === 0) return <p className="text-sm text-ink-muted">No reports from the public.</p>;
  return (
    <ul className="flex flex-col gap-4">
      {reports.map((r) => (
        <li key={r.id} className="rounded-card border border-line p-4">
          <p className="flex flex-wrap items-center gap-2 text-sm">
            <Badge tone={r.state === "open" ? "warn" : "neutral"}>{r.state}</Badge>
            <Badge>{KIND_LABEL[r.kind]}</Badge>
            <span>
              from {r.reporterEmail}, {formatDateTime(r.createdAt)}
            </span>
          </p>
          <p className="mt-2 whitespace-pre-line">{r.message}</p>
          {r.answer ? (
            <p className="mt-2 border-l-2 border-line pl-3 text-sm">
              Answered by {r.answeredByName ?? "a curator"} on {formatDate(r.answeredAt)}: {r.answer}
            </p>
          ) : null}
          {r.state === "closed" ? null : <AnswerForm plateId={plateId} reportId={r.id} />}
        </li>
      ))}
    </ul>
  );
}
