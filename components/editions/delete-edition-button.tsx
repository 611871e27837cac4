"use client";
// Deletes a draft edition after a confirm step in a dialog (reachable by
// keyboard; Escape or "Keep it" backs out). The server refuses an exported
// edition all the same.
import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import { callApi } from "@/components/forms/call-api";

export function DeleteEditionButton({ editionId, title, itemCount }: { editionId: string; title: string; itemCount: number }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function remove() {
    setPending(true);
    setError(null);
    const res = await callApi("DELETE", `/api/editions/${editionId}`);
    if (!res.ok) {
      setPending(false);
      setOpen(false);
      return setError(res.problem.message);
    }
    router.push("/editions");
  }

  const plates = itemCount === 0 ? "It holds no plates." : `Its ${itemCount === 1 ? "plate leaves" : `${itemCount} plates leave`} it; the plates themselves stay as they are.`;
  return (
    <div className="flex flex-col items-start gap-2">
      <Button variant="danger" onClick={() => setOpen(true)}>
        Delete this edition…
      </Button>
      {error ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {error}
        </p>
      ) : null}
      <Dialog
        open={open}
        onClose={() => setOpen(false)}
        title={`Delete “${title}”?`}
        description={`${plates} This cannot be undone.`}
        dismissOnBackdrop={!pending}
        actions={
          <>
            <Button variant="secondary" onClick={() => setOpen(false)} disabled={pending}>
              Keep it
            </Button>
            <Button variant="danger" pending={pending} pendingLabel="Deleting…" onClick={remove}>
              Delete the edition
            </Button>
          </>
        }
      />
    </div>
  );
}
