"use client";
// A plate's versions with their permanent links, and the form that replaces
// the reduction (or composite) it shows (version n+1 with a change note).
import Link from "next/link";
import { useRef, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import type { DeskPlateDto } from "@/lib/plates/desk-view";
import { formatDate, formatDateTime } from "@/lib/format/dates";
import { fetchJson } from "@/lib/http/client-fetch";
import { RenditionsPicker } from "./renditions-picker";

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
  const formRef = useRef<HTMLFormElement>(null);
  const add = useApiMutation(
    (form: FormData) =>
      fetchJson<{ version: number }>(`/api/review/plates/${plateId}/versions`, {
        body: { [field]: String(form.get(field) ?? ""), renditions: form.getAll("renditions").map(String), changeNote: String(form.get("changeNote") ?? "") },
      }),
    { onSuccess: () => formRef.current?.reset() },
  );
  const problem = add.error;

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    add.mutate(new FormData(e.currentTarget));
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
        <form ref={formRef} onSubmit={submit} noValidate className="flex max-w-xl flex-col gap-3">
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
          <Feedback problem={problem} success={add.data ? `Version ${add.data.version} is now the current one.` : null} />
          <div>
            <ScriptSubmitButton pending={add.isPending} pendingLabel="Adding the version…">
              Add the version
            </ScriptSubmitButton>
          </div>
        </form>
      )}
    </div>
  );
}
