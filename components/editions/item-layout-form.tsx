"use client";
// One plate's layout in the edition: slot (a preset, or a custom width in mm
// at a dpi), rendition and a caption for this edition only. The server checks
// every value; the custom fields only show for the custom slot.
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import { callApi, type ApiProblem } from "@/components/forms/call-api";

export interface ItemLayoutFormProps {
  editionId: string;
  itemId: string;
  plateTitle: string;
  slot: string;
  customWidthMm: number | null;
  customDpi: number | null;
  rendition: string;
  renditions: string[];
  captionOverride: string | null;
  plateCaption: string;
  slotOptions: { value: string; label: string }[];
  readOnly: boolean;
}

export function ItemLayoutForm(props: ItemLayoutFormProps) {
  const router = useRouter();
  const [slot, setSlot] = useState(props.slot);
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const [done, setDone] = useState(false);

  async function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setProblem(null);
    setDone(false);
    const res = await callApi("PATCH", `/api/editions/${props.editionId}/items/${props.itemId}`, {
      slot,
      customWidthMm: slot === "custom" ? String(form.get("customWidthMm") ?? "") : undefined,
      customDpi: slot === "custom" ? String(form.get("customDpi") ?? "") : undefined,
      rendition: String(form.get("rendition") ?? ""),
      captionOverride: String(form.get("captionOverride") ?? ""),
    });
    setPending(false);
    if (!res.ok) return setProblem(res.problem);
    setDone(true);
    router.refresh();
  }

  return (
    <form onSubmit={submit} noValidate aria-label={`Layout of “${props.plateTitle}”`} className="flex min-w-64 flex-col gap-3">
      <Field label="Layout slot" error={problem?.fields.slot}>
        <Select name="slot" value={slot} onChange={(e) => setSlot(e.target.value)} options={props.slotOptions} disabled={props.readOnly} />
      </Field>
      {slot === "custom" ? (
        <div className="flex gap-3">
          <Field label="Width (mm)" required error={problem?.fields.customWidthMm}>
            <Input name="customWidthMm" type="number" inputMode="decimal" min={10} max={1000} step="any" defaultValue={props.customWidthMm ?? ""} className="w-28" disabled={props.readOnly} />
          </Field>
          <Field label="Resolution (dpi)" required error={problem?.fields.customDpi}>
            <Input name="customDpi" type="number" inputMode="numeric" min={72} max={1200} step={1} defaultValue={props.customDpi ?? 300} className="w-28" disabled={props.readOnly} />
          </Field>
        </div>
      ) : null}
      <Field label="Rendition" error={problem?.fields.rendition}>
        <Select name="rendition" defaultValue={props.rendition} options={props.renditions.map((r) => ({ value: r, label: r }))} disabled={props.readOnly} />
      </Field>
      <Field label="Caption in this edition" hint="Leave empty to print the plate's own caption." error={problem?.fields.captionOverride}>
        <Textarea name="captionOverride" rows={2} maxLength={2000} defaultValue={props.captionOverride ?? ""} placeholder={props.plateCaption} disabled={props.readOnly} />
      </Field>
      {problem ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {Object.keys(problem.fields).length ? "Please correct the marked fields." : problem.message}
        </p>
      ) : null}
      {done ? (
        <p role="status" className="text-sm">
          Saved.
        </p>
      ) : null}
      {props.readOnly ? null : (
        <div>
          <Button type="submit" size="sm" pending={pending} pendingLabel="Saving…">
            Save layout
          </Button>
        </div>
      )}
    </form>
  );
}
