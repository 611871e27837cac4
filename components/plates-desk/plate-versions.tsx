"use client";
// A plate's versions with their permanent links, and the form that replaces
// the reduction (or composite) it shows (version n+1 with a change note).
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import type { DeskPlateDto } from "@/lib/plates/desk-view";
import { callApi, type ApiProblem } from "@/components/forms/call-api";
import { RenditionsPicker } from "./renditions-picker";
import { formatDate, formatDateTime } from "@/lib/format/dates";

export interface PlateVersionsProps {
  plateId: string;
  currentVersion: number;
  versions: DeskPlateDto["versions"];
  finishedReductions: DeskPlateDto["finishedReductions"];
  sourceKind: DeskPlateDto["sourceKind"];
  /** A plate withdrawn for good takes no new versions. */
  readOnly: boolean;
}

export function PlateVersions({ plateId, currentVersion, versions, finishedReductions, sourceKind, readOnly }: PlateVersionsProps) {
  const field = sourceKind === "composite" ? "compositeId" : "reductionId";
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [done, setDone] = useState<string | null>(null);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const formEl = e.currentTarget;
    const form = new FormData(formEl);
    setPending(true);
    setProblem(null);
    setDone(null);
    const res = await callApi<{ version: number }>("POST", `/api/review/plates/${plateId}/versions`, {
      [field]: String(form.get(field) ?? ""),
      renditions: form.getAll("renditions").map(String),
      changeNote: String(form.get("changeNote") ?? ""),
    });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    setDone(`Version ${res.data.version} is now the current one.`);
    formEl.reset();
    router.refresh();
  }

  return (
    <div className="flex flex-col gap-6">
      <ol className="flex flex-col gap-2 text-sm">
        {versions.map((v) => (
          <li key={v.version}>
            <span className="font-medium">Version {v.version}</span>
            {v.version === currentVersion ? " (current)" : ""}: {v.changeNote || "no note"}. {formatDate(v.createdAt)}, renditions {v.renditions.join(" and ")}.{" "}
            <Link href={v.url} className="underline">
              Permanent link {v.url}
            </Link>
          </li>
        ))}
      </ol>
      {readOnly ? null : (
        <form onSubmit={submit} noValidate className="flex max-w-xl flex-col gap-3">
          <h3 className="text-base font-semibold">{sourceKind === "composite" ? "Replace the composite (new version)" : "Replace the reduction (new version)"}</h3>
          <Field label={sourceKind === "composite" ? "Composite" : "Reduction"} required error={problem?.fields[field]}>
            <Select
              name={field}
              options={finishedReductions.map((r) => ({
                value: r.id,
                label:
                  sourceKind === "composite"
                    ? `“${r.title ?? "Composite"}”, ${r.filter.toUpperCase()}, ${r.finishedAt ? formatDateTime(r.finishedAt) : "unfinished"} (pipeline ${r.pipelineVersion ?? "unknown"})`
                    : `${r.filter.toUpperCase()}, registered on ${r.registration}, ${r.finishedAt ? formatDateTime(r.finishedAt) : "unfinished"} (pipeline ${r.pipelineVersion ?? "unknown"})`,
              }))}
            />
          </Field>
          <RenditionsPicker legend="Renditions to show" error={problem?.fields.renditions} />
          <Field label="Change note" required hint="Shown beside the version on the public page." error={problem?.fields.changeNote}>
            <Textarea name="changeNote" rows={2} maxLength={500} />
          </Field>
          {problem ? (
            <p role="alert" className="text-sm font-medium text-danger">
              {problem.message}
            </p>
          ) : null}
          {done ? (
            <p role="status" className="text-sm">
              {done}
            </p>
          ) : null}
          <div>
            <Button type="submit" pending={pending} pendingLabel="Adding the version…">
              Add the version
            </Button>
          </div>
        </form>
      )}
    </div>
  );
}
