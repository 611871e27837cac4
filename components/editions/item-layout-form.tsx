"use client";
// One plate's layout in the edition: slot (a preset, or a custom width in mm
// at a dpi), rendition and a caption for this edition only. What the slot
// needs against what the rendition has follows every change at once, before
// saving (the same sums the server and the export use, lib/editions/print-sizes.ts).
// The server checks every value; the custom fields only show for the custom slot.
import { useId, useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import { compareWithRendition, CUSTOM_DPI, CUSTOM_MM, SLOT_SPECS, type PixelSize, type SlotKey, type SlotNeed } from "@/lib/editions/print-sizes";
import { fetchJson } from "@/lib/http/client-fetch";

export interface ItemLayoutFormProps {
  editionId: string;
  itemId: string;
  plateTitle: string;
  slot: string;
  customWidthMm: number | null;
  customDpi: number | null;
  rendition: string;
  renditions: string[];
  /** Pixel size of each rendition of the pinned version. */
  imageSizes: Partial<Record<string, PixelSize>>;
  captionOverride: string | null;
  plateCaption: string;
  slotOptions: { value: string; label: string }[];
  readOnly: boolean;
}

const RENDITION_LABELS: Record<string, string> = { natural: "Natural", structure: "Structure" };

type Panel = { kind: "need"; need: SlotNeed; label: string } | { kind: "incomplete"; reason: string } | { kind: "unknown"; reason: string };

/** The slot's need against the rendition, from the values on screen (saved or not). */
function comparePanel(slot: string, widthMm: string, dpi: string, rendition: string, sizes: Partial<Record<string, PixelSize>>): Panel {
  const available = sizes[rendition];
  if (!available) return { kind: "unknown", reason: `The ${RENDITION_LABELS[rendition]?.toLowerCase() ?? rendition} rendition of this version has no recorded size.` };
  let custom: { widthMm: number; dpi: number } | null = null;
  if (slot === "custom") {
    const w = Number(widthMm);
    const d = Number(dpi);
    if (!(widthMm.trim() && w >= CUSTOM_MM.min && w <= CUSTOM_MM.max) || !(dpi.trim() && d >= CUSTOM_DPI.min && d <= CUSTOM_DPI.max)) {
      return { kind: "incomplete", reason: `Give a width from ${CUSTOM_MM.min} to ${CUSTOM_MM.max} mm and a resolution from ${CUSTOM_DPI.min} to ${CUSTOM_DPI.max} dpi to see what the slot needs.` };
    }
    custom = { widthMm: w, dpi: d };
  }
  const label = slot === "custom" ? `Custom, ${custom!.widthMm} mm at ${custom!.dpi} dpi` : (SLOT_SPECS[slot as Exclude<SlotKey, "custom">]?.label ?? slot);
  return { kind: "need", need: compareWithRendition(slot as SlotKey, custom, available), label };
}

export function ItemLayoutForm(props: ItemLayoutFormProps) {
  const panelId = useId();
  const [slot, setSlot] = useState(props.slot);
  const [widthMm, setWidthMm] = useState(props.customWidthMm === null ? "" : String(props.customWidthMm));
  const [dpi, setDpi] = useState(String(props.customDpi ?? 300));
  const [rendition, setRendition] = useState(props.rendition);
  const save = useApiMutation((body: Record<string, unknown>) => fetchJson(`/api/editions/${props.editionId}/items/${props.itemId}`, { method: "PATCH", body }));
  const problem = save.error;
  const panel = comparePanel(slot, widthMm, dpi, rendition, props.imageSizes);
  const unsaved = slot !== props.slot || rendition !== props.rendition || (slot === "custom" && (widthMm !== String(props.customWidthMm ?? "") || dpi !== String(props.customDpi ?? 300)));

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    save.mutate({
      slot,
      customWidthMm: slot === "custom" ? widthMm : undefined,
      customDpi: slot === "custom" ? dpi : undefined,
      rendition,
      captionOverride: String(form.get("captionOverride") ?? ""),
    });
  }

  return (
    <form onSubmit={submit} noValidate aria-label={`Layout of “${props.plateTitle}”`} className="flex min-w-0 flex-col gap-3">
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Layout slot" error={problem?.fields.slot}>
          <Select name="slot" value={slot} onChange={(e) => setSlot(e.target.value)} options={props.slotOptions} disabled={props.readOnly} aria-controls={panelId} />
        </Field>
        <Field label="Rendition" error={problem?.fields.rendition}>
          <Select name="rendition" value={rendition} onChange={(e) => setRendition(e.target.value)} options={props.renditions.map((r) => ({ value: r, label: RENDITION_LABELS[r] ?? r }))} disabled={props.readOnly} aria-controls={panelId} />
        </Field>
      </div>
      {slot === "custom" ? (
        <div className="flex flex-wrap gap-3">
          <Field label="Width (mm)" required error={problem?.fields.customWidthMm}>
            <Input name="customWidthMm" type="number" inputMode="decimal" min={CUSTOM_MM.min} max={CUSTOM_MM.max} step="any" value={widthMm} onChange={(e) => setWidthMm(e.target.value)} className="w-28" disabled={props.readOnly} aria-controls={panelId} />
          </Field>
          <Field label="Resolution (dpi)" required error={problem?.fields.customDpi}>
            <Input name="customDpi" type="number" inputMode="numeric" min={CUSTOM_DPI.min} max={CUSTOM_DPI.max} step={1} value={dpi} onChange={(e) => setDpi(e.target.value)} className="w-28" disabled={props.readOnly} aria-controls={panelId} />
          </Field>
        </div>
      ) : null}

      <div id={panelId} role="status" aria-live="polite" className="rounded-control border border-line p-3 text-sm">
        <p className="font-medium">
          Pixels needed and available{unsaved ? <span className="font-normal text-ink-muted"> (for the values above, not saved yet)</span> : null}
        </p>
        {panel.kind === "need" ? (
          <>
            <p className="text-ink-muted">{panel.label}</p>
            <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3">
              <dt>Needed</dt>
              <dd>
                {panel.need.needed.width} x {panel.need.needed.height} px
              </dd>
              <dt>Available</dt>
              <dd>
                {panel.need.available.width} x {panel.need.available.height} px
              </dd>
            </dl>
            {panel.need.warning ? (
              <p className="mt-2 rounded-control border border-danger p-2 font-medium text-danger">
                <span aria-hidden="true">⚠ </span>
                {panel.need.warning}
              </p>
            ) : (
              <p className="mt-2">Large enough: no enlargement.</p>
            )}
          </>
        ) : (
          <p className="mt-1">{panel.reason}</p>
        )}
      </div>

      <div className="flex flex-col gap-1.5">
        <p className="text-sm font-medium">The plate&apos;s own caption</p>
        <p className="rounded-control border border-line bg-surface-sunken p-2 text-sm">{props.plateCaption || <span className="text-ink-muted">The plate has no caption.</span>}</p>
      </div>
      <Field label="Caption in this edition" hint="Printed instead of the plate's own caption. Leave empty to print the plate's own." error={problem?.fields.captionOverride}>
        <Textarea name="captionOverride" rows={2} maxLength={2000} defaultValue={props.captionOverride ?? ""} disabled={props.readOnly} />
      </Field>
      <Feedback problem={problem} summarizeFields success={save.isSuccess ? "Saved." : null} />
      {props.readOnly ? null : (
        <div>
          <ScriptSubmitButton size="sm" pending={save.isPending} pendingLabel="Saving…">
            Save layout
          </ScriptSubmitButton>
        </div>
      )}
    </form>
  );
}
