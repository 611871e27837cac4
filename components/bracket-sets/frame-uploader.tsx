"use client";
// Sends frames straight from the browser to S3 with presigned multipart
// uploads (Uppy's S3 plugin): our route handlers start, sign, list, complete
// and abort each upload; the bytes never pass through the app server. An upload
// interrupted by a reload or a lost connection resumes when the same file is
// chosen again: the server remembers the upload, and S3 the parts it holds.
import AwsS3, { type AwsS3Part } from "@uppy/aws-s3";
import Uppy, { type Meta, type UppyFile } from "@uppy/core";
import { useRouter } from "next/navigation";
import { useEffect, useId, useMemo, useRef, useState, useSyncExternalStore, type DragEvent } from "react";
import type { FrameDto, SignedPartsDto, UploadDto, UploadPartsDto } from "@/lib/bracket-sets/dto";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { ProgressBar } from "@/components/ui/progress-bar";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";
import { FILE_INPUT_CLASSES, FRAME_EXTENSIONS, formatBytes, type UploadLimits } from "./upload-limits";

type FrameMeta = Meta & { frameId?: string };
type FrameBody = Record<string, never>;
type FrameFile = UppyFile<FrameMeta, FrameBody>;

type FileRow = {
  id: string;
  name: string;
  size: number;
  uploaded: number;
  state: "waiting" | "uploading" | "paused" | "done" | "refused";
  resumed: boolean;
  message?: string;
  /** The frame the upload became, once the server has recorded it. */
  frameId?: string;
};

/** Where a sent file ended: measured, refused with the reason, a duplicate, or still being checked. */
type Outcome = { tone: "ok" | "danger" | "neutral"; text: string };

function outcomeOf(frame: FrameDto | undefined, wasSeen: boolean, byId: ReadonlyMap<string, FrameDto>): Outcome {
  if (!frame) return wasSeen ? { tone: "neutral", text: "Removed from the set" } : { tone: "neutral", text: "Sent; being checked and measured" };
  if (frame.ingestState === "received") return { tone: "neutral", text: "Sent; being checked and measured" };
  if (frame.ingestState === "refused") {
    const first = frame.flags.duplicateOfFrameId ? byId.get(frame.flags.duplicateOfFrameId) : undefined;
    if (frame.flags.duplicateOfFrameId) return { tone: "danger", text: `Duplicate: the same file as ${first?.fileName ?? "a frame"} already in the set, so it was not stored twice` };
    return { tone: "danger", text: `Refused: ${frame.refusalReason ?? "no reason was recorded"}` };
  }
  const missing = [frame.needsExposure ? "give its exposure" : "", frame.needsTime ? "give its capture time" : ""].filter(Boolean);
  return { tone: "ok", text: `Measured${missing.length ? `; ${missing.join(" and ")} in the frame table` : ""}` };
}

const PARALLEL_PARTS = 4;

function subscribeOnline(onChange: () => void): () => void {
  window.addEventListener("online", onChange);
  window.addEventListener("offline", onChange);
  return () => {
    window.removeEventListener("online", onChange);
    window.removeEventListener("offline", onChange);
  };
}

function rowOf(f: FrameFile, resumedIds: ReadonlySet<string>, frameIds: ReadonlyMap<string, string>): FileRow {
  const p = f.progress;
  const size = f.size ?? 0;
  let state: FileRow["state"] = "waiting";
  if (f.error) state = "refused";
  else if (p.uploadComplete) state = "done";
  else if (f.isPaused) state = "paused";
  else if (p.uploadStarted) state = "uploading";
  return {
    id: f.id,
    name: f.name ?? "unnamed file",
    size,
    uploaded: typeof p.bytesUploaded === "number" ? p.bytesUploaded : 0,
    state,
    resumed: resumedIds.has(f.id),
    message: f.error ?? undefined,
    frameId: frameIds.get(f.id),
  };
}

export function FrameUploader({ setId, limits, openUploads, frames }: { setId: string; limits: UploadLimits; openUploads: UploadDto[]; frames: FrameDto[] }) {
  const router = useRouter();
  const inputId = useId();
  const statusId = useId();
  const [uppyRows, setRows] = useState<FileRow[]>([]);
  // Files the server refused on arrival (a fault of the file, not of the connection): taken out of Uppy so that
  // a later batch does not send them again, and kept here with the reason.
  const [refusedRows, setRefusedRows] = useState<FileRow[]>([]);
  const rows = useMemo(() => [...uppyRows, ...refusedRows], [uppyRows, refusedRows]);
  const isOnline = useSyncExternalStore(subscribeOnline, () => navigator.onLine, () => true);
  const [isDragging, setIsDragging] = useState(false);
  const [notice, setNotice] = useState("");
  const resumedIds = useRef(new Set<string>());
  // Uppy's file id -> the frame it became, from the completion's answer; frames seen on the page, to tell "removed" from "not yet read".
  const frameIds = useRef(new Map<string, string>());
  const [seenFrames, setSeenFrames] = useState<ReadonlySet<string>>(() => new Set());
  const framesById = useMemo(() => new Map(frames.map((f) => [f.id, f])), [frames]);
  // Frames the page has shown: one that is gone later was removed (state adjusted while rendering, as React advises for derived state).
  if (frames.some((f) => !seenFrames.has(f.id))) setSeenFrames(new Set([...seenFrames, ...frames.map((f) => f.id)]));
  // Uploads the server still holds open (from an earlier page), matched by name and size.
  const pending = useRef(new Map(openUploads.map((u) => [`${u.fileName}\u0000${u.sizeBytes}`, u])));
  const [interrupted, setInterrupted] = useState(openUploads);
  const refreshTimer = useRef<ReturnType<typeof setTimeout> | null>(null);

  const uppy = useMemo(() => {
    const base = `/api/bracket-sets/${setId}/uploads`;
    return new Uppy<FrameMeta, FrameBody>({
      id: `frames-${setId}`,
      autoProceed: true,
      allowMultipleUploadBatches: true,
      restrictions: { maxFileSize: limits.maxFileSizeBytes, maxNumberOfFiles: limits.maxFilesPerSet, allowedFileTypes: [...FRAME_EXTENSIONS] },
    }).use(AwsS3<FrameMeta, FrameBody>, {
      shouldUseMultipart: true,
      limit: PARALLEL_PARTS,
      retryDelays: [0, 1000, 3000, 5000, 10000],
      getChunkSize: () => limits.partSizeBytes,
      async createMultipartUpload(file) {
        const u = await fetchJson<UploadDto>(base, {
          body: { fileName: file.name, sizeBytes: file.size, contentType: file.type || undefined },
        });
        return { uploadId: u.id, key: u.frameId };
      },
      async signPart(_file, { uploadId, partNumber, signal }) {
        const signed = await fetchJson<SignedPartsDto>(`${base}/${uploadId}/parts`, { body: { partNumbers: [partNumber] }, signal });
        const url = signed.urls.find((u) => u.partNumber === partNumber)?.url;
        if (!url) throw new Error(`The server signed no address for part ${partNumber}.`);
        return { method: "PUT", url };
      },
      async listParts(_file, { uploadId, signal }): Promise<AwsS3Part[]> {
        const held = await fetchJson<UploadPartsDto>(`${base}/${uploadId}/parts`, { signal });
        return held.parts.map((p) => ({ PartNumber: p.partNumber, Size: p.sizeBytes, ETag: p.etag }));
      },
      async completeMultipartUpload(_file, { uploadId, signal }) {
        // The server asks S3 which parts arrived and checks the whole file.
        const frame = await fetchJson<FrameDto>(`${base}/${uploadId}/complete`, { method: "POST", body: {}, signal });
        // A repeated completion answers with the frame as first recorded, refused or not.
        if (frame.ingestState === "refused") throw new Error(frame.refusalReason ?? `${frame.fileName} was refused.`);
        return { location: `/api/bracket-sets/${setId}/frames/${frame.id}` };
      },
      async abortMultipartUpload(_file, { uploadId, signal }) {
        await fetchJson<UploadDto>(`${base}/${uploadId}`, { method: "DELETE", signal });
      },
    });
    // Keyed on the values, not the object: the page's server data are read again while frames are checked,
    // and a new Uppy for each read would drop the list and stall the files being sent.
  }, [setId, limits.maxFileSizeBytes, limits.maxFilesPerSet, limits.partSizeBytes]);

  useEffect(() => {
    const sync = () => setRows(uppy.getFiles().map((f) => rowOf(f, resumedIds.current, frameIds.current)));
    const refreshSoon = () => {
      if (refreshTimer.current) clearTimeout(refreshTimer.current);
      refreshTimer.current = setTimeout(() => router.refresh(), 400);
    };
    const onAdded = (file: FrameFile) => {
      const key = `${file.name}\u0000${file.size}`;
      const open = pending.current.get(key);
      if (open) {
        pending.current.delete(key);
        setInterrupted((list) => list.filter((u) => u.id !== open.id));
        resumedIds.current.add(file.id);
        // With an upload id and key in its state, Uppy asks which parts S3 holds and sends the rest.
        uppy.setFileState(file.id, { s3Multipart: { uploadId: open.id, key: open.frameId } } as Partial<FrameFile>);
      }
    };
    const onRestricted = (file: FrameFile | undefined, error: Error) => {
      setNotice(`${file?.name ?? "A file"}: ${error.message}`);
    };
    uppy.on("state-update", sync);
    uppy.on("file-added", onAdded);
    uppy.on("restriction-failed", onRestricted);
    const onSuccess = (file: FrameFile | undefined, response: { uploadURL?: string }) => {
      const frameId = /\/frames\/([0-9a-f-]{36})$/.exec(response?.uploadURL ?? "")?.[1];
      if (file && frameId) frameIds.current.set(file.id, frameId);
      sync();
      refreshSoon();
    };
    uppy.on("upload-success", onSuccess);
    const onError = (file: FrameFile | undefined, error: Error) => {
      if (file && error instanceof ApiProblem && error.isRefusal) {
        setRefusedRows((list) => [...list, { ...rowOf(file, resumedIds.current, frameIds.current), state: "refused", message: error.message }]);
        uppy.removeFile(file.id);
      }
      refreshSoon();
    };
    uppy.on("upload-error", onError);
    return () => {
      uppy.off("state-update", sync);
      uppy.off("file-added", onAdded);
      uppy.off("restriction-failed", onRestricted);
      uppy.off("upload-success", onSuccess);
      uppy.off("upload-error", onError);
      if (refreshTimer.current) clearTimeout(refreshTimer.current);
    };
  }, [uppy, router]);

  // Leaving the page cancels nothing on the server: the open uploads resume later.
  useEffect(() => () => uppy.destroy(), [uppy]);

  function addFiles(list: FileList | null) {
    if (!list) return;
    setNotice("");
    for (const file of Array.from(list)) {
      try {
        uppy.addFile({ name: file.name, type: file.type, data: file, source: "Local" });
      } catch (err) {
        // Uppy refuses duplicates in one session and files over the limits; say which.
        setNotice(`${file.name}: ${(err as Error).message}`);
      }
    }
  }

  function onDrop(e: DragEvent<HTMLDivElement>) {
    e.preventDefault();
    setIsDragging(false);
    addFiles(e.dataTransfer.files);
  }

  const total = rows.reduce((s, r) => s + r.size, 0);
  const sent = rows.reduce((s, r) => s + (r.state === "done" ? r.size : Math.min(r.uploaded, r.size)), 0);
  const active = rows.filter((r) => r.state === "uploading" || r.state === "waiting").length;
  const paused = rows.filter((r) => r.state === "paused").length;
  const failed = rows.filter((r) => r.state === "refused").length;
  const done = rows.filter((r) => r.state === "done").length;
  const outcomes = rows.map((r) => (r.state === "done" && r.frameId ? outcomeOf(framesById.get(r.frameId), seenFrames.has(r.frameId), framesById) : null));
  const measured = outcomes.filter((o) => o?.tone === "ok").length;
  const refusedLater = outcomes.filter((o) => o?.tone === "danger").length;
  const summary = rows.length
    ? `${done} of ${rows.length} file${rows.length === 1 ? "" : "s"} sent, ${formatBytes(sent)} of ${formatBytes(total)}` +
      (paused ? `, ${paused} paused` : "") +
      (failed ? `, ${failed} refused` : "") +
      (done ? `; ${measured} measured${refusedLater ? `, ${refusedLater} refused on checking` : ""}` : "")
    : "No files chosen yet.";

  return (
    <section aria-labelledby={`${inputId}-heading`} className="flex flex-col gap-4">
      <h2 id={`${inputId}-heading`} className="text-xl font-semibold">
        Add frames
      </h2>
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setIsDragging(true);
        }}
        onDragLeave={() => setIsDragging(false)}
        onDrop={onDrop}
        className={`flex flex-col items-start gap-3 rounded-card border-2 border-dashed p-5 ${isDragging ? "border-accent bg-surface-hover" : "border-line-strong"}`}
      >
        <label htmlFor={inputId} className="font-medium">
          Choose frames (FITS, TIFF, DNG or camera raw, JPEG, PNG), or drop them here
        </label>
        <input
          id={inputId}
          type="file"
          multiple
          accept={FRAME_EXTENSIONS.join(",")}
          aria-describedby={`${inputId}-hint`}
          onChange={(e) => {
            addFiles(e.target.files);
            e.target.value = "";
          }}
          className={FILE_INPUT_CLASSES}
        />
        <p id={`${inputId}-hint`} className="text-sm text-ink-muted">
          Up to {formatBytes(limits.maxFileSizeBytes)} a file and {limits.maxFilesPerSet} files a set. Files go straight to storage in{" "}
          {formatBytes(limits.partSizeBytes)} parts; the server checks each one when it has arrived, and the same frame twice is reported, not stored twice.
        </p>
      </div>

      {interrupted.length ? (
        <div role="note" className="rounded-card border border-warn p-4 text-sm">
          <p className="font-medium">
            {interrupted.length} upload{interrupted.length === 1 ? " was" : "s were"} interrupted. Choose the same file{interrupted.length === 1 ? "" : "s"} again to
            continue from where {interrupted.length === 1 ? "it" : "they"} stopped:
          </p>
          <ul className="mt-2 list-disc pl-5 font-mono">
            {interrupted.map((u) => (
              <li key={u.id}>
                {u.fileName} ({formatBytes(u.sizeBytes)})
              </li>
            ))}
          </ul>
        </div>
      ) : null}

      {!isOnline ? (
        <p role="alert" className="rounded-card border border-danger p-3 text-sm font-medium text-danger">
          The connection is lost. Uploads wait and continue by themselves when it comes back.
        </p>
      ) : null}
      <Feedback problem={notice} />

      <div className="flex flex-col gap-3">
        {/* No bar until a file is chosen: an empty bar would move as if something were under way. */}
        {rows.length ? (
          <ProgressBar label="All files" value={sent} max={total || 1} valueText={summary} tone={failed ? "danger" : done === rows.length ? "ok" : "accent"} />
        ) : null}
        <p id={statusId} role="status" aria-live="polite" className="text-sm text-ink-muted">
          {summary}
        </p>
        {rows.length ? (
          <div className="flex flex-wrap gap-2">
            <Button size="sm" onClick={() => uppy.pauseAll()} disabled={active === 0}>
              Pause all
            </Button>
            <Button size="sm" onClick={() => uppy.resumeAll()} disabled={paused === 0}>
              Resume all
            </Button>
            <Button size="sm" onClick={() => void uppy.retryAll()} disabled={uppyRows.every((r) => r.state !== "refused")}>
              Try failed files again
            </Button>
            <Button
              size="sm"
              variant="quiet"
              onClick={() => {
                uppyRows.filter((r) => r.state === "done" || r.state === "refused").forEach((r) => uppy.removeFile(r.id));
                setRefusedRows([]);
              }}
              disabled={done + failed === 0}
            >
              Clear finished from this list
            </Button>
          </div>
        ) : null}
      </div>

      {rows.length ? (
        <ul className="flex flex-col gap-3" aria-label="Files being sent">
          {rows.map((r, i) => (
            <li key={r.id} className="rounded-card border border-line p-3">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <span className="font-mono text-sm break-all">{r.name}</span>
                <span className="text-sm text-ink-muted">
                  {formatBytes(r.size)}
                  {r.resumed ? " · resumed" : ""}
                </span>
              </div>
              <ProgressBar
                className="mt-2"
                label={<span className="sr-only">{r.name}</span>}
                value={r.state === "done" ? r.size : r.uploaded}
                max={r.size || 1}
                tone={r.state === "refused" ? "danger" : r.state === "done" ? "ok" : "accent"}
                valueText={r.state === "done" ? "sent" : r.state === "refused" ? "refused" : `${Math.round((100 * r.uploaded) / (r.size || 1))} %`}
              />
              <div className="mt-2 flex flex-wrap items-center gap-2 text-sm">
                <span className={outcomes[i] ? (outcomes[i].tone === "ok" ? "font-medium text-ok" : outcomes[i].tone === "danger" ? "font-medium text-danger" : "") : ""}>
                  {outcomes[i]?.text ?? stateText(r)}
                </span>
                {r.state === "uploading" || r.state === "waiting" ? (
                  <Button size="sm" variant="quiet" onClick={() => uppy.pauseResume(r.id)} aria-label={`Pause ${r.name}`}>
                    Pause
                  </Button>
                ) : null}
                {r.state === "paused" ? (
                  <Button size="sm" variant="quiet" onClick={() => uppy.pauseResume(r.id)} aria-label={`Resume ${r.name}`}>
                    Resume
                  </Button>
                ) : null}
                {r.state !== "done" ? (
                  <Button
                    size="sm"
                    variant="quiet"
                    onClick={() => (refusedRows.some((x) => x.id === r.id) ? setRefusedRows((list) => list.filter((x) => x.id !== r.id)) : uppy.removeFile(r.id))}
                    aria-label={`Cancel ${r.name}`}
                  >
                    Cancel
                  </Button>
                ) : null}
              </div>
              {r.message ? <p className="mt-1 text-sm font-medium text-danger">{r.message}</p> : null}
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}

function stateText(r: FileRow): string {
  switch (r.state) {
    case "waiting":
      return "Waiting";
    case "uploading":
      return `Sending: ${formatBytes(r.uploaded)} of ${formatBytes(r.size)}`;
    case "paused":
      return "Paused";
    case "done":
      return "Sent; being checked and measured";
    case "refused":
      return "Refused";
  }
}
