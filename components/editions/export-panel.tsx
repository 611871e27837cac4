"use client";
// The edition's print bundles: choose the variants and the file name template,
// start an export, follow its progress (polled every second, announced
// politely at each new step), download finished bundles, and reopen an
// exported edition for changes. The server checks the editor on every call.
import { useRouter } from "next/navigation";
import { useEffect, useRef, useState, type FormEvent } from "react";
import { useExportProgress } from "@/components/data/progress-queries";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Checkbox } from "@/components/ui/checkbox";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { ProgressBar } from "@/components/ui/progress-bar";
import type { ExportDto } from "@/lib/editions/export/exports";
import { DEFAULT_FILE_NAME_TEMPLATE, FILE_NAME_FIELDS } from "@/lib/editions/file-names";
import { formatBytes } from "@/lib/format/bytes";
import { formatDateTime } from "@/lib/format/dates";
import { fetchJson } from "@/lib/http/client-fetch";

const TONE = { queued: "neutral", running: "neutral", done: "ok", failed: "danger" } as const;
const isUnderWay = (e: ExportDto) => e.state === "queued" || e.state === "running";

interface ExportOptions {
  cmyk: boolean;
  greyscale: boolean;
  fileNameTemplate: string;
}

export function ExportPanel({ editionId, editionState, itemCount, initial }: { editionId: string; editionState: "draft" | "exported"; itemCount: number; initial: ExportDto[] }) {
  const router = useRouter();
  // Exports started here that the server-rendered list does not hold yet.
  const [started, setStarted] = useState<ExportDto[]>([]);
  const [announce, setAnnounce] = useState("");
  const lastStage = useRef<string | null>(null);
  const known = [...started.filter((e) => !initial.some((x) => x.id === e.id)), ...initial];
  // The server runs one export of an edition at a time: the one it last said is under way is followed.
  const followed = useExportProgress(editionId, known.find(isUnderWay)?.id ?? null);
  const exports = known.map((e) => (followed.data?.id === e.id ? followed.data : e));
  const active = exports.find(isUnderWay);

  // Each new step is announced politely; the end reads the page's data again (the edition's state, the bundle).
  const latest = followed.data;
  useEffect(() => {
    if (!latest) return;
    if (latest.stage && latest.stage !== lastStage.current) {
      lastStage.current = latest.stage;
      setAnnounce(latest.state === "done" ? "The print bundle is ready to download." : latest.state === "failed" ? `The export failed: ${latest.error ?? "no reason given"}` : latest.stage);
    }
    if (!isUnderWay(latest)) router.refresh();
  }, [latest, router]);

  const start = useApiMutation((options: ExportOptions) => fetchJson<{ export: ExportDto }>(`/api/editions/${editionId}/exports`, { body: options }), {
    onSuccess: (data) => {
      lastStage.current = null;
      setAnnounce("Export started. The plates are held until the bundle is done.");
      setStarted((list) => [data.export, ...list]);
    },
  });
  const reopen = useApiMutation(() => fetchJson(`/api/editions/${editionId}/reopen`, { body: {} }), {
    onSuccess: () => setAnnounce("The edition is a draft again; its bundles stay below."),
  });

  function submit(ev: FormEvent<HTMLFormElement>) {
    ev.preventDefault();
    const form = new FormData(ev.currentTarget);
    start.mutate({ cmyk: form.get("cmyk") === "on", greyscale: form.get("greyscale") === "on", fileNameTemplate: String(form.get("fileNameTemplate") ?? "") });
  }

  return (
    <div className="space-y-6">
      <p role="status" aria-live="polite" className="sr-only">
        {announce}
      </p>
      {editionState === "exported" ? (
        <div className="flex flex-wrap items-center gap-3 rounded-control border border-line p-3 text-sm">
          <p>This edition was exported, so its plates are fixed. Reopen it to change them; the bundles made so far stay.</p>
          <Button type="button" size="md" variant="secondary" onClick={() => reopen.mutate()} pending={reopen.isPending} pendingLabel="Reopening…">
            Reopen for changes
          </Button>
          <Feedback problem={reopen.error?.message} className="w-full" />
        </div>
      ) : null}
      <form onSubmit={submit} noValidate className="space-y-4" aria-describedby="export-what">
        <p id="export-what" className="text-sm text-ink-muted">
          Each plate becomes a 16-bit TIFF (LZW, sRGB with its profile) and a high-quality JPEG at the size its slot needs, with the credits, licence, caption, alt text and
          astronomy metadata written into every file; the bundle adds a captions file, a credits file, a metadata JSON and a PDF proof with each plate at its printed size.
        </p>
        <fieldset className="space-y-2">
          <legend className="mb-1 font-medium">Extra variants</legend>
          <Checkbox name="cmyk" label="CMYK TIFF for the printer" hint="8-bit CMYK; the profile used is named in the bundle's metadata." />
          <Checkbox name="greyscale" label="Greyscale TIFF" hint="16-bit grey, for black-and-white pages." />
        </fieldset>
        <Field label="File names" hint={`Fields: ${FILE_NAME_FIELDS.map((f) => `{${f}}`).join(", ")}. Unsafe characters become hyphens.`} error={start.error?.fields.fileNameTemplate}>
          <Input name="fileNameTemplate" defaultValue={DEFAULT_FILE_NAME_TEMPLATE} spellCheck={false} autoComplete="off" />
        </Field>
        {/* A problem with the file names shows under that field. */}
        <Feedback problem={start.error?.hasFields ? null : start.error} />
        <ScriptSubmitButton size="md" pending={start.isPending} pendingLabel="Starting…" disabled={Boolean(active) || itemCount === 0}>
          Make print bundle
        </ScriptSubmitButton>
        {itemCount === 0 ? <p className="text-sm text-ink-muted">Add a plate first.</p> : null}
      </form>

      <div>
        <h3 className="mb-2 text-lg font-semibold">Bundles</h3>
        {exports.length === 0 ? <p className="text-sm text-ink-muted">No bundles yet.</p> : null}
        <Feedback problem={followed.error ? `Progress could not be read: ${followed.error.message} Reload the page to see where the export is.` : null} className="mb-2" />
        <ul className="space-y-3">
          {exports.map((e) => (
            <li key={e.id} className="rounded-control border border-line p-3">
              <div className="flex flex-wrap items-center gap-2 text-sm">
                <Badge tone={TONE[e.state]}>{e.state}</Badge>
                <span>Started {formatDateTime(e.createdAt)}</span>
                <span className="text-ink-muted">
                  {[e.options.cmyk ? "CMYK" : null, e.options.greyscale ? "greyscale" : null].filter(Boolean).join(", ") || "sRGB and JPEG only"}
                </span>
              </div>
              {e.state === "queued" || e.state === "running" ? (
                <ProgressBar className="mt-2" label={e.stage ?? "Waiting for the worker"} value={Math.round(e.progress * 100)} />
              ) : null}
              {e.state === "failed" ? <p className="mt-2 text-sm font-medium text-danger">Failed: {e.error}</p> : null}
              {e.state === "done" && e.downloadUrl ? (
                <div className="mt-2 space-y-1 text-sm">
                  <p>
                    <a href={e.downloadUrl} download className="font-medium">
                      Download {e.zipName}
                    </a>{" "}
                    ({e.bytes !== null ? formatBytes(e.bytes) : "size unknown"}, {e.fileCount} files)
                  </p>
                  {e.warnings.length ? (
                    <ul className="list-disc pl-5 text-danger">
                      {e.warnings.map((w) => (
                        <li key={w}>{w}</li>
                      ))}
                    </ul>
                  ) : null}
                </div>
              ) : null}
            </li>
          ))}
        </ul>
      </div>
    </div>
  );
}
