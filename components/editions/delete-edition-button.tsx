"use client";
// Deletes a draft edition after a confirm step in a dialog (reachable by
// keyboard; Escape or "Keep it" backs out). The server refuses an exported
// edition all the same.
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import { Feedback } from "@/components/ui/feedback";
import { fetchJson } from "@/lib/http/client-fetch";

export function DeleteEditionButton({ editionId, title, itemCount }: { editionId: string; title: string; itemCount: number }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const remove = useApiMutation(() => fetchJson(`/api/editions/${editionId}`, { method: "DELETE" }), {
    refresh: false,
    onSuccess: () => router.push("/editions"),
    onError: () => setOpen(false),
  });
  // Still pending while the browser leaves for the list of editions.
  const pending = remove.isPending || remove.isSuccess;

  const plates = itemCount === 0 ? "It holds no plates." : `Its ${itemCount === 1 ? "plate leaves" : `${itemCount} plates leave`} it; the plates themselves stay as they are.`;
  return (
    <div className="flex flex-col items-start gap-2">
      <Button variant="danger" onClick={() => setOpen(true)}>
        Delete this edition…
      </Button>
      <Feedback problem={remove.error} />
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
            <Button variant="danger" pending={pending} pendingLabel="Deleting…" onClick={() => remove.mutate()}>
              Delete the edition
            </Button>
          </>
        }
      />
    </div>
  );
}
