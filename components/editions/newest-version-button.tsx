"use client";
// Offers a plate's newer version for an item pinned to an older one. The item
// keeps its pin until the editor takes the newer version here; afterwards the
// answer (and any change of rendition) stays in view and takes the focus, as
// the button it replaces is gone.
import { useRouter } from "next/navigation";
import { useEffect, useRef, useTransition } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { fetchJson } from "@/lib/http/client-fetch";

interface Answer {
  version: number;
  renditionNote: string | null;
}

export function NewestVersionButton({ editionId, itemId, plateTitle, version, currentVersion }: { editionId: string; itemId: string; plateTitle: string; version: number; currentVersion: number }) {
  const router = useRouter();
  const [refreshing, startRefresh] = useTransition();
  const take = useApiMutation(() => fetchJson<Answer>(`/api/editions/${editionId}/items/${itemId}/newest-version`, { method: "POST" }), {
    refresh: false,
    onSuccess: () => startRefresh(() => router.refresh()),
  });
  const answer = take.data;
  const done = useRef<HTMLParagraphElement>(null);

  // Focus the answer once the refreshed page shows the item at its new version.
  useEffect(() => {
    if (answer && version === answer.version) done.current?.focus();
  }, [answer, version]);

  if (answer && version === answer.version) {
    return (
      <p ref={done} tabIndex={-1} className="mt-1 text-sm font-medium">
        Now version {answer.version}.{answer.renditionNote ? ` ${answer.renditionNote}` : ""}
      </p>
    );
  }
  if (currentVersion <= version) return null;
  return (
    <div className="mt-1 flex flex-col items-start gap-1">
      <p className="text-sm font-medium">Version {currentVersion} is newer.</p>
      <Button size="sm" pending={take.isPending || refreshing} pendingLabel="Switching…" onClick={() => take.mutate()} aria-label={`Use version ${currentVersion} of “${plateTitle}”`}>
        Use version {currentVersion}
      </Button>
      <Feedback problem={take.error} />
    </div>
  );
}
