"use client";
import Link from "next/link";
import { useId, useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import type { OrientationOutlook } from "@/lib/bracket-sets/orientation";
import { fetchJson } from "@/lib/http/client-fetch";

const NORTH_LABELS = { northAngleDeg: "North angle" };

/**
 * The set's kit and where north will come from, changeable while frames may
 * still be corrected. Asked before a run: when no kit or a mount without a
 * reference (hand-held, stabilised) leaves north to be estimated, the page says
 * so and offers the kit, a new kit, or the north angle itself.
 */
export function KitChooser({
  setId,
  kitId,
  kits,
  outlook,
  northAngleDeg,
}: {
  setId: string;
  kitId: string | null;
  kits: { id: string; name: string }[];
  outlook: OrientationOutlook;
  northAngleDeg: number | null;
}) {
  const id = useId();
  const [value, setValue] = useState(kitId ?? "");
  const patch = (body: Record<string, unknown>) => fetchJson(`/api/bracket-sets/${setId}`, { method: "PATCH", body });
  const kit = useApiMutation((kitId: string) => patch({ kitId: kitId || null }));
  const north = useApiMutation((text: string) => patch({ northAngleDeg: text === "" ? null : text }));
  const saveNorth = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    north.mutate(String(new FormData(e.currentTarget).get("northAngleDeg") ?? "").trim());
  };
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex flex-col gap-1.5">
          <label htmlFor={id} className="text-sm font-medium">
            Kit the frames were taken with
          </label>
          <select id={id} value={value} onChange={(e) => setValue(e.target.value)} className="max-w-full rounded-control border border-line-strong bg-surface-raised px-3 py-2">
            <option value="">No kit</option>
            {kits.map((k) => (
              <option key={k.id} value={k.id}>
                {k.name}
              </option>
            ))}
          </select>
        </div>
        <Button onClick={() => kit.mutate(value)} pending={kit.isPending} pendingLabel="Saving…" disabled={value === (kitId ?? "")}>
          Save kit
        </Button>
        <Link href={kitId ? `/studio/kits/${kitId}` : "/studio/kits/new"} className="pb-2 text-sm">
          {kitId ? "Edit this kit's mount and optics" : "Make a new kit"}
        </Link>
      </div>
      <Feedback live look="tinted" problem={kit.error} success={kit.isSuccess ? (kit.variables ? "Kit saved; new reductions use its plate scale and mount." : "The set has no kit now.") : null} />
      <div className={`max-w-3xl rounded-card border p-4 ${outlook.needsAnswer ? "border-warn/60 bg-warn/10" : "border-line"}`}>
        <h3 className="font-semibold">North in the image</h3>
        <p className={`mt-1 text-sm ${outlook.needsAnswer ? "text-warn" : "text-ink-muted"}`}>{outlook.text}</p>
        <form onSubmit={saveNorth} className="mt-3 flex flex-wrap items-end gap-3">
          <label className="flex flex-col gap-1 text-sm font-medium">
            North angle (degrees counter-clockwise from the top of the image)
            <input
              name="northAngleDeg"
              defaultValue={northAngleDeg === null ? "" : String(northAngleDeg)}
              inputMode="decimal"
              autoComplete="off"
              size={8}
              aria-describedby={`${id}-north-hint`}
              className="w-32 rounded-control border border-line-strong bg-surface-raised px-3 py-2 font-mono"
            />
          </label>
          <ScriptSubmitButton pending={north.isPending} pendingLabel="Saving…">
            Save north angle
          </ScriptSubmitButton>
        </form>
        <p id={`${id}-north-hint`} className="mt-1 text-xs text-ink-muted">
          For example from a star field or a plate solve of a frame taken with the same set-up. Leave it empty to let the kit&apos;s mount decide.
        </p>
        <Feedback
          live
          look="tinted"
          problem={north.error}
          labels={NORTH_LABELS}
          success={north.isSuccess ? (north.variables === "" ? "The north angle is forgotten; the kit's mount decides again." : "North angle saved; new reductions use it.") : null}
        />
      </div>
    </div>
  );
}
