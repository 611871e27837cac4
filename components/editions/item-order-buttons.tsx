"use client";
// Move a plate up or down in the edition, or take it out. Positions stay 1..n on the server.
// After a move the refreshed page puts the row in its new place: the focus goes back to
// the button that was pressed (or its sibling, when that one is now disabled at either
// end), and the new position is announced politely through the page's live region.
import { useCallback, useEffect, useRef } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { focusAfterMove, type OrderDirection } from "@/components/editions/order-focus";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { useToast } from "@/components/ui/use-toast";
import { fetchJson } from "@/lib/http/client-fetch";

export interface ItemOrderButtonsProps {
  editionId: string;
  itemId: string;
  plateTitle: string;
  /** 1..count, as the page last rendered it. */
  position: number;
  count: number;
}

export function ItemOrderButtons({ editionId, itemId, plateTitle, position, count }: ItemOrderButtonsProps) {
  const toast = useToast();
  const up = useRef<HTMLButtonElement>(null);
  const down = useRef<HTMLButtonElement>(null);
  // The move waiting for the refreshed page: which button was pressed, and where the server put the plate.
  const moved = useRef<{ pressed: OrderDirection; position: number } | null>(null);
  const base = `/api/editions/${editionId}/items/${itemId}`;
  const move = useApiMutation((direction: OrderDirection) => fetchJson<{ position: number }>(`${base}/move`, { body: { direction } }), {
    onSuccess: (data, direction) => {
      moved.current = { pressed: direction, position: data.position };
    },
  });
  const remove = useApiMutation(() => fetchJson(base, { method: "DELETE" }));
  const pending: OrderDirection | "remove" | null = move.isPending ? move.variables : remove.isPending ? "remove" : null;
  const isFirst = position === 1;
  const isLast = position === count;

  const settle = useCallback(() => {
    const done = moved.current;
    if (!done || done.position !== position) return;
    // Done with this move before anything else: a later refresh must not take the focus again.
    moved.current = null;
    const target = focusAfterMove(done.pressed, position, count);
    if (target) (target === "up" ? up : down).current?.focus();
    toast.notify(`“${plateTitle}” is now number ${position} of ${count}.`);
  }, [position, count, plateTitle, toast]);

  // Runs when the refreshed page hands this row its new position, and once the pressed
  // button is enabled again (a move that changed nothing brings no new position).
  useEffect(() => {
    if (pending === null) settle();
  }, [pending, settle]);

  // One message at a time: a new press forgets the other button's refusal.
  const press = (direction: OrderDirection) => {
    remove.reset();
    move.mutate(direction);
  };
  const takeOut = () => {
    move.reset();
    remove.mutate();
  };

  return (
    <div className="flex flex-col gap-2">
      <Button ref={up} size="sm" disabled={isFirst} pending={pending === "up"} onClick={() => press("up")} aria-label={`Up: move “${plateTitle}” earlier`}>
        ↑ Up
      </Button>
      <Button ref={down} size="sm" disabled={isLast} pending={pending === "down"} onClick={() => press("down")} aria-label={`Down: move “${plateTitle}” later`}>
        ↓ Down
      </Button>
      <Button size="sm" variant="danger" pending={pending === "remove"} pendingLabel="Removing…" onClick={takeOut} aria-label={`Take out “${plateTitle}”`}>
        Take out
      </Button>
      <Feedback problem={move.error ?? remove.error} />
    </div>
  );
}
