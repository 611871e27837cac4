"use client";
// Move a plate up or down in the edition, or take it out. Positions stay 1..n on the server.
import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { callApi } from "@/components/forms/call-api";

export function ItemOrderButtons({ editionId, itemId, plateTitle, isFirst, isLast }: { editionId: string; itemId: string; plateTitle: string; isFirst: boolean; isLast: boolean }) {
  const router = useRouter();
  const [pending, setPending] = useState<string | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const base = `/api/editions/${editionId}/items/${itemId}`;

  async function run(what: "up" | "down" | "remove") {
    setPending(what);
    setMessage(null);
    const res = what === "remove" ? await callApi("DELETE", base) : await callApi("POST", `${base}/move`, { direction: what });
    setPending(null);
    if (!res.ok) return setMessage(res.problem.message);
    router.refresh();
  }

  return (
    <div className="flex flex-col gap-2">
      <Button size="sm" disabled={isFirst} pending={pending === "up"} onClick={() => run("up")} aria-label={`Up: move “${plateTitle}” earlier`}>
        ↑ Up
      </Button>
      <Button size="sm" disabled={isLast} pending={pending === "down"} onClick={() => run("down")} aria-label={`Down: move “${plateTitle}” later`}>
        ↓ Down
      </Button>
      <Button size="sm" variant="danger" pending={pending === "remove"} pendingLabel="Removing…" onClick={() => run("remove")} aria-label={`Take out “${plateTitle}”`}>
        Take out
      </Button>
      {message ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {message}
        </p>
      ) : null}
    </div>
  );
}
