"use client";
// Reports from the public on one plate, open first, each with its answer form.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Textarea } from "@/components/ui/textarea";
import type { PlateReportDto } from "@/lib/plates/reports";
import { callApi, type ApiProblem } from "@/components/forms/call-api";
import { formatDate, formatDateTime } from "@/lib/format/dates";

const KIND_LABEL = { rights: "Rights", error: "Error", other: "Other" } as const;

function AnswerForm({ plateId, reportId }: { plateId: string; reportId: string }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setProblem(null);
    const res = await callApi("POST", `/api/review/plates/${plateId}/reports/${reportId}/answer`, { answer: String(form.get("answer") ?? ""), close: form.get("close") === "on" });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    router.refresh();
  }

  return (
    <form onSubmit={submit} noValidate className="mt-3 flex flex-col gap-2">
      <Field label="Answer to the reporter (sent by e-mail)" required error={problem?.fields.answer}>
        <Textarea name="answer" rows={3} maxLength={4000} />
      </Field>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" name="close" defaultChecked /> Close the report with this answer
      </label>
      {problem ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {problem.message}
        </p>
      ) : null}
      <div>
        <Button type="submit" size="sm" pending={pending} pendingLabel="Sending…">
          Send the answer
        </Button>
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
