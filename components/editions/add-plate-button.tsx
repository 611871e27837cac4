"use client";
// Adds a published plate to the edition. When the plate is already in another
// edition the server adds it all the same and names those editions: the
// warning stays on screen so the editor can take it out again.
import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { callApi } from "@/components/forms/call-api";

interface Other {
  id: string;
  title: string;
  issueLabel: string;
  embargoDate: string | null;
}

export function AddPlateButton({ editionId, plateId, plateTitle }: { editionId: string; plateId: string; plateTitle: string }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<{ tone: "ok" | "warn" | "error"; text: string } | null>(null);

  async function add() {
    setPending(true);
    setMessage(null);
    const res = await callApi<{ itemId: string; alsoIn: Other[] }>("POST", `/api/editions/${editionId}/items`, { plateId });
    setPending(false);
    if (!res.ok) return setMessage({ tone: "error", text: res.problem.message });
    const also = res.data.alsoIn;
    setMessage(
      also.length
        ? { tone: "warn", text: `Added, but “${plateTitle}” is already in ${also.map((e) => `“${e.title}${e.issueLabel ? `, ${e.issueLabel}` : ""}”`).join(" and ")}. Check it is not offered to two outlets by mistake.` }
        : { tone: "ok", text: `Added “${plateTitle}”.` },
    );
    router.refresh();
  }

  return (
    <div className="flex flex-col gap-1">
      <div>
        <Button size="sm" pending={pending} pendingLabel="Adding…" onClick={add} aria-label={`Add “${plateTitle}” to the edition`}>
          Add
        </Button>
      </div>
      {message ? (
        <p role={message.tone === "ok" ? "status" : "alert"} className={message.tone === "ok" ? "text-sm" : "text-sm font-medium text-danger"}>
          {message.text}
        </p>
      ) : null}
    </div>
  );
}
