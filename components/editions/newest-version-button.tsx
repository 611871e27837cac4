"use client";
// Offers a plate's newer version for an item pinned to an older one. The item
// keeps its pin until the editor takes the newer version here; afterwards the
// answer (and any change of rendition) stays in view and takes the focus, as
// the button it replaces is gone.
import { useRouter } from "next/navigation";
import { useEffect, useRef, useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import { callApi } from "@/components/forms/call-api";

interface Answer {
  version: number;
  renditionNote: string | null;
}

export function NewestVersionButton({ editionId, itemId, plateTitle, version, currentVersion }: { editionId: string; itemId: string; plateTitle: string; version: number; currentVersion: number }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [refreshing, startRefresh] = useTransition();
  const [error, setError] = useState<string | null>(null);
  const [answer, setAnswer] = useState<Answer | null>(null);
  const done = useRef<HTMLParagraphElement>(null);

  // Focus the answer once the refreshed page shows the item at its new version.
  useEffect(() => {
    if (answer && version === answer.version) done.current?.focus();
  }, [answer, version]);

  async function take() {
    setPending(true);
    setError(null);
    const res = await callApi<Answer>("POST", `/api/editions/${editionId}/items/${itemId}/newest-version`);
    setPending(false);
    if (!res.ok) return setError(res.problem.message);
    setAnswer(res.data);
    startRefresh(() => router.refresh());
  }

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
      <Button size="sm" pending={pending || refreshing} pendingLabel="Switching…" onClick={take} aria-label={`Use version ${currentVersion} of “${plateTitle}”`}>
        Use version {currentVersion}
      </Button>
      {error ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {error}
        </p>
      ) : null}
    </div>
  );
}
