"use client";
// Adds a published plate to the edition. When the plate is already in another
// edition the server adds it all the same and names those editions: the
// warning stays on screen so the editor can take it out again.
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { fetchJson } from "@/lib/http/client-fetch";

interface Other {
  id: string;
  title: string;
  issueLabel: string;
  embargoDate: string | null;
}

export function AddPlateButton({ editionId, plateId, plateTitle }: { editionId: string; plateId: string; plateTitle: string }) {
  const add = useApiMutation(() => fetchJson<{ itemId: string; alsoIn: Other[] }>(`/api/editions/${editionId}/items`, { body: { plateId } }));
  const also = add.data?.alsoIn ?? [];
  const warning = also.length
    ? `Added, but “${plateTitle}” is already in ${also.map((e) => `“${e.title}${e.issueLabel ? `, ${e.issueLabel}` : ""}”`).join(" and ")}. Check it is not offered to two outlets by mistake.`
    : null;

  return (
    <div className="flex flex-col gap-1">
      <div>
        <Button size="sm" pending={add.isPending} pendingLabel="Adding…" onClick={() => add.mutate()} aria-label={`Add “${plateTitle}” to the edition`}>
          Add
        </Button>
      </div>
      <Feedback problem={add.error ?? warning} success={add.isSuccess ? `Added “${plateTitle}”.` : null} />
    </div>
  );
}
