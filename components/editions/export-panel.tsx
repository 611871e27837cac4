"use client";
// The edition's print bundles: choose the variants and the file name template,
// start an export, follow its progress (polled every second, announced
// politely at each new step), download finished bundles, and reopen an
// exported edition for changes. The server checks the editor on every call.
import { useRouter } from "next/navigation";
import { useEffect, useRef, useState, type FormEvent } from "react";
import { callApi, type ApiProblem } from "@/components/forms/call-api";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Checkbox } from "@/components/ui/checkbox";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { ProgressBar } from "@/components/ui/progress-bar";
import type { ExportDto } from "@/lib/editions/export/exports";
import { DEFAULT_FILE_NAME_TEMPLATE, FILE_NAME_FIELDS } from "@/lib/editions/file-names";
import { formatBytes } from "@/lib/format/bytes";
import { formatDateTime } from "@/lib/format/dates";

const TONE = { queued: "neutral", running: "neutral", done: "ok", failed: "danger" } as const;

export function ExportPanel({ editionId, editionState, itemCount, initial }: { editionId: string; editionState: "draft" | "exported"; itemCount: number; initial: ExportDto[] }) {
  const router = useRouter();
  const [exports, setExports] = useState(initial);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [reopenProblem, setReopenProblem] = useState<string | null>(null);
  const [starting, setStarting] = useState(false);
  const [reopening, setReopening] = useState(false);
  const [pollProblem, setPollProblem] = useState<string | null>(null);
  const [announce, setAnnounce] = useState("");
  const active = exports.find((e) => e.state === "queued" || e.state === "running");
  const activeId = active?.id ?? null;
  const lastStage = useRef<string | null>(null);

  // Polls the export under way once a second, one request at a time; stops with a message when the server refuses.
  useEffect(() => {
    if (!activeId) return;
    let stopped = false;
    let timer: number | undefined;
    const tick = async () => {
      const res = await callApi<{ export: ExportDto }>("GET", `/api/editions/${editionId}/exports/${activeId}`);
      if (stopped) return;
      if (!res.ok) {
        setPollProblem(`Progress could not be read: ${res.problem.message} Reload the page to see where the export is.`);
        return;
      }
      const e = res.data.export;
      setExports((list) => list.map((x) => (x.id === e.id ? e : x)));
      if (e.stage && e.stage !== lastStage.current) {
        lastStage.current = e.stage;
        setAnnounce(e.state === "done" ? "The print bundle is ready to download." : e.state === "failed" ? `The export failed: ${e.error ?? "no reason given"}` : e.stage);
      }
      if (e.state === "done" || e.state === "failed") router.refresh();
      else timer = window.setTimeout(tick, 1000);
    };
    timer = window.setTimeout(tick, 1000);
    return () => {
      stopped = true;
      window.clearTimeout(timer);
    };
  }, [activeId, editionId, router]);

  async function start(ev: FormEvent<HTMLFormElement>) {
    ev.preventDefault();
    const form = new FormData(ev.currentTarget);
    setStarting(true);
    setProblem(null);
    setPollProblem(null);
    const res = await callApi<{ export: ExportDto }>("POST", `/api/editions/${editionId}/exports`, {
      cmyk: form.get("cmyk") === "on",
      greyscale: form.get("greyscale") === "on",
      fileNameTemplate: String(form.get("fileNameTemplate") ?? ""),
    });
    setStarting(false);
    if (!res.ok) return setProblem(res.problem);
    lastStage.current = null;
    setAnnounce("Export started. The plates are held until the bundle is done.");
    setExports((list) => [res.data.export, ...list]);
    router.refresh();
  }

  async function reopen() {
    setReopening(true);
    setReopenProblem(null);
    const res = await callApi("POST", `/api/editions/${editionId}/reopen`, {});
    setReopening(false);
    if (!res.ok) return setReopenProblem(res.problem.message);
    setAnnounce("The edition is a draft again; its bundles stay below.");
    router.refresh();
  }

  const generalError = problem && !Object.keys(problem.fields).length ? problem.message : null;
  return (
    <div className="space-y-6">
      <p role="status" aria-live="polite" className="sr-only">
        {announce}
      </p>
      {editionState === "exported" ? (
        <div className="flex flex-wrap items-center gap-3 rounded-control border border-line p-3 text-sm">
          <p>This edition was exported, so its plates are fixed. Reopen it to change them; the bundles made so far stay.</p>
          <Button type="button" size="md" variant="secondary" onClick={reopen} pending={reopening} pendingLabel="Reopening…">
            Reopen for changes
          </Button>
          {reopenProblem ? (
            <p role="alert" className="w-full font-medium text-danger">
              {reopenProblem}
            </p>
          ) : null}
        </div>
      ) : null}
      <form onSubmit={start} noValidate className="space-y-4" aria-describedby="export-what">
        <p id="export-what" className="text-sm text-ink-muted">
          Each plate becomes a 16-bit TIFF (LZW, sRGB with its profile) and a high-quality JPEG at the size its slot needs, with the credits, licence, caption, alt text and
          astronomy metadata written into every file; the bundle adds a captions file, a credits file, a metadata JSON and a PDF proof with each plate at its printed size.
        </p>
        <fieldset className="space-y-2">
          <legend className="mb-1 font-medium">Extra variants</legend>
          <Checkbox name="cmyk" label="CMYK TIFF for the printer" hint="8-bit CMYK; the profile used is named in the bundle's metadata." />
          <Checkbox name="greyscale" label="Greyscale TIFF" hint="16-bit grey, for black-and-white pages." />
        </fieldset>
        <Field label="File names" hint={`Fields: ${FILE_NAME_FIELDS.map((f) => `{${f}}`).join(", ")}. Unsafe characters become hyphens.`} error={problem?.fields.fileNameTemplate}>
          <Input name="fileNameTemplate" defaultValue={DEFAULT_FILE_NAME_TEMPLATE} spellCheck={false} autoComplete="off" />
        </Field>
        {generalError ? (
          <p role="alert" className="text-sm font-medium text-danger">
            {generalError}
          </p>
        ) : null}
        <Button type="submit" size="md" pending={starting} pendingLabel="Starting…" disabled={Boolean(active) || itemCount === 0}>
          Make print bundle
        </Button>
        {itemCount === 0 ? <p className="text-sm text-ink-muted">Add a plate first.</p> : null}
      </form>

      <div>
        <h3 className="mb-2 text-lg font-semibold">Bundles</h3>
        {exports.length === 0 ? <p className="text-sm text-ink-muted">No bundles yet.</p> : null}
        {pollProblem ? (
          <p role="alert" className="mb-2 text-sm font-medium text-danger">
            {pollProblem}
          </p>
        ) : null}
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
