"use client";
// What pages follow while the worker is busy, as TanStack Query queries that
// poll (refetchInterval) only while something is queued or running and stop by
// themselves when it ends: a reduction's or a composite's run, the frames of a
// bracket set being checked on arrival (with the set's reductions), and an
// edition's print bundle. Polling goes on in a background tab, as the worker does.
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect, useState } from "react";
import type { BracketSetDto } from "@/lib/bracket-sets/dto";
import type { ExportDto } from "@/lib/editions/export/exports";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";
import type { ReductionDto } from "@/lib/reductions/reductions";

export const progressKeys = {
  run: (kind: RunKind, id: string) => [kind === "reduction" ? "reductions" : "composites", id, "progress"] as const,
  setActivity: (setId: string, watchFrames: boolean, excludeReductionId: string | null) => ["bracket-sets", setId, "activity", { watchFrames, excludeReductionId }] as const,
  export: (editionId: string, exportId: string) => ["editions", editionId, "exports", exportId] as const,
};

type JobState = "queued" | "running" | "done" | "failed";
const isUnderWay = (state: JobState | undefined) => state === "queued" || state === "running";

// ---- A reduction's or a composite's run -------------------------------------------------

export type RunKind = "reduction" | "composite";

export interface RunProgress {
  state: JobState;
  stage: string | null;
  /** Fraction 0..1 of the current stage. */
  progress: number;
  /** Frames done of frames to do, when the stage works frame by frame. */
  stageFrames?: { done: number; total: number } | null;
  error: string | null;
}

const RUN_POLL_MS = 1000;
/** After this many failed reads in a row the page says it lost contact (and keeps trying, more slowly). */
export const QUIET_FAILURES = 3;

/**
 * A run's state from GET /api/reductions/{id} or /api/composites/{id}, read
 * every second while it is queued or running. A run that is no longer visible
 * (404) or a session that ended (401) ends the polling with a reason.
 */
export function useRunProgress(kind: RunKind, id: string, initial: RunProgress) {
  const queryClient = useQueryClient();
  const key = progressKeys.run(kind, id);
  // Failed reads in a row; a successful read starts the count again.
  const [failures, setFailures] = useState(0);
  const query = useQuery({
    queryKey: key,
    queryFn: async ({ signal }): Promise<RunProgress> => {
      const url = kind === "reduction" ? `/api/reductions/${encodeURIComponent(id)}` : `/api/composites/${encodeURIComponent(id)}`;
      try {
        const body = await fetchJson<RunProgress>(url, { signal });
        setFailures(0);
        return { state: body.state, stage: body.stage, progress: body.progress, stageFrames: body.stageFrames ?? null, error: body.error };
      } catch (err) {
        if (err instanceof ApiProblem && (err.status === 404 || err.status === 401)) {
          const last = queryClient.getQueryData<RunProgress>(key) ?? initial;
          const error = err.status === 404 ? `This ${kind} is no longer visible to you.` : `Your session ended: sign in again to follow the ${kind}.`;
          return { ...last, state: "failed", error };
        }
        if (err instanceof ApiProblem) setFailures((n) => n + 1);
        throw err;
      }
    },
    initialData: initial,
    // A finished run does not change: read it only while it is under way.
    staleTime: (q) => (isUnderWay(q.state.data?.state) ? 0 : Infinity),
    refetchInterval: (q) => (isUnderWay(q.state.data?.state) ? (failures >= QUIET_FAILURES ? RUN_POLL_MS * 5 : RUN_POLL_MS) : false),
    refetchIntervalInBackground: true,
  });
  return { progress: query.data, hasLostContact: failures >= QUIET_FAILURES && isUnderWay(query.data.state) };
}

// ---- A bracket set's frames being checked, and its reductions ---------------------------------

export interface SetActivity {
  /** Frames received and not yet checked. */
  checking: number;
  /** Reductions queued or running (other than the one the page follows itself). */
  running: number;
  /** Changes whenever a frame's check or a reduction has moved; null for the counts the server rendered. */
  fingerprint: string | null;
}

const isBusy = (a: SetActivity | undefined) => Boolean(a && (a.checking > 0 || a.running > 0));

/**
 * A bracket set's activity, read every few seconds while frames are being
 * checked or reductions run. The page's server-rendered data are read again
 * (router.refresh, by the caller) whenever the fingerprint moves.
 */
export function useSetActivity({
  setId,
  initial,
  watchFrames,
  excludeReductionId = null,
  intervalMs,
}: {
  setId: string;
  initial: { checking: number; running: number };
  watchFrames: boolean;
  excludeReductionId?: string | null;
  intervalMs: number;
}) {
  const queryClient = useQueryClient();
  const query = useQuery({
    queryKey: progressKeys.setActivity(setId, watchFrames, excludeReductionId),
    queryFn: async ({ signal }): Promise<SetActivity> => {
      const [set, list] = await Promise.all([
        watchFrames ? fetchJson<BracketSetDto>(`/api/bracket-sets/${encodeURIComponent(setId)}`, { signal }) : null,
        fetchJson<{ reductions: ReductionDto[] }>(`/api/bracket-sets/${encodeURIComponent(setId)}/reductions`, { signal }),
      ]);
      const frames = set?.frames ?? [];
      const reductions = list.reductions.filter((r) => r.id !== excludeReductionId);
      return {
        checking: frames.filter((f) => f.ingestState === "received").length,
        running: reductions.filter((r) => isUnderWay(r.state)).length,
        fingerprint: [...frames.map((f) => `${f.id}:${f.ingestState}`), ...reductions.map((r) => `${r.id}:${r.state}:${r.stage}:${r.progress}`)].join(","),
      };
    },
    initialData: { ...initial, fingerprint: null },
    staleTime: (q) => (isBusy(q.state.data) ? 0 : Infinity),
    refetchInterval: (q) => (isBusy(q.state.data) ? intervalMs : false),
    refetchIntervalInBackground: true,
  });

  // The server rendered new work (a reduction started, frames arrived) that the last read did not know: follow it.
  const { checking, running } = initial;
  useEffect(() => {
    const fromServer: SetActivity = { checking, running, fingerprint: null };
    const known = progressKeys.setActivity(setId, watchFrames, excludeReductionId);
    if (isBusy(fromServer) && !isBusy(queryClient.getQueryData<SetActivity>(known))) queryClient.setQueryData(known, fromServer);
  }, [checking, running, setId, watchFrames, excludeReductionId, queryClient]);

  return query.data;
}

// ---- An edition's print bundle ------------------------------------------------------------

const EXPORT_POLL_MS = 1000;

/**
 * The export under way, read every second until it is done or failed. A read
 * the server refuses stops the polling (the page says so).
 */
export function useExportProgress(editionId: string, exportId: string | null) {
  return useQuery({
    queryKey: progressKeys.export(editionId, exportId ?? ""),
    queryFn: async ({ signal }) => (await fetchJson<{ export: ExportDto }>(`/api/editions/${editionId}/exports/${exportId}`, { signal })).export,
    enabled: exportId !== null,
    refetchInterval: (q) => (q.state.error || (q.state.data && !isUnderWay(q.state.data.state)) ? false : EXPORT_POLL_MS),
    refetchIntervalInBackground: true,
  });
}
