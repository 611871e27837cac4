"use client";
import { useId, useState } from "react";
import { Button } from "@/components/ui/button";
import { callApi } from "./api-client";
import { useApiAction } from "./use-api-action";

/** The set's kit, changeable while frames may still be corrected. Without one, a Sun-centred reduction must guess the orientation. */
export function KitChooser({ setId, kitId, kits }: { setId: string; kitId: string | null; kits: { id: string; name: string }[] }) {
  const id = useId();
  const [value, setValue] = useState(kitId ?? "");
  const { pending, message, run } = useApiAction();
  const save = () =>
    run(
      () => callApi(`/api/bracket-sets/${setId}`, { method: "PATCH", body: { kitId: value || null } }),
      () => (value ? "Kit saved; new reductions use its plate scale and mount." : "The set has no kit now."),
    );
  return (
    <div className="flex flex-col gap-2">
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex flex-col gap-1.5">
          <label htmlFor={id} className="text-sm font-medium">
            Kit the frames were taken with
          </label>
          <select id={id} value={value} onChange={(e) => setValue(e.target.value)} className="rounded-control border border-line-strong bg-surface-raised px-3 py-2">
            <option value="">No kit</option>
            {kits.map((k) => (
              <option key={k.id} value={k.id}>
                {k.name}
              </option>
            ))}
          </select>
        </div>
        <Button onClick={() => void save()} pending={pending} pendingLabel="Saving…" disabled={value === (kitId ?? "")}>
          Save kit
        </Button>
      </div>
      {!kitId ? (
        <p className="text-sm text-warn">
          Without a kit, a reduction aligned on the Sun must find the image orientation from the Moon&apos;s motion in the bracket, which a bracket of a few seconds rarely allows.
          Choose the kit whose mount says how the camera was turned.
        </p>
      ) : null}
      <p role="status" aria-live="polite" className="text-sm font-medium">
        {message ? <span className={message.tone === "ok" ? "text-ok" : "text-danger"}>{message.text}</span> : null}
      </p>
    </div>
  );
}
