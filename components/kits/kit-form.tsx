"use client";
import { useActionState } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Checkbox } from "@/components/ui/checkbox";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { SubmitButton } from "@/components/ui/submit-button";
import { Textarea } from "@/components/ui/textarea";
import type { FormAction } from "@/lib/http/action-result";


export interface KitValues {
  id?: string;
  name: string;
  camera: string;
  sensorWidthMm: number | "";
  sensorHeightMm: number | "";
  pixelPitchUm: number | "";
  focalMm: number | "";
  teleconverter: number | "";
  fNumber: number | "";
  mount: string;
  flipHorizontal: boolean;
  flipVertical: boolean;
  notes: string;
}

const MOUNT_OPTIONS = [
  { value: "equatorial", label: "Equatorial (tracks the sky; north stays put)" },
  { value: "alt-az", label: "Alt-azimuth, tracking (the field rotates)" },
  { value: "fixed-tripod", label: "Fixed tripod (no tracking)" },
  { value: "hand-held", label: "Hand-held" },
  { value: "stabilised", label: "Stabilised platform (ship or aircraft)" },
];

export function KitForm({ action, initial, submitLabel }: { action: FormAction; initial: KitValues; submitLabel: string }) {
  const [state, formAction] = useActionState(action, null);
  const err = (f: string) => state?.fields?.find((x) => x.field === f)?.message;
  // After a refused submission, show what was typed (React resets the form).
  const v = (name: keyof KitValues): string => state?.values?.[name] ?? String(initial[name]);
  const checked = (name: "flipHorizontal" | "flipVertical"): boolean => (state?.values ? state.values[name] === "on" : initial[name]);
  const num = (name: keyof KitValues, label: string, hint: string, step = "any") => (
    <Field label={label} hint={hint} error={err(name)} required>
      <Input name={name} type="number" inputMode="decimal" step={step} min="0" defaultValue={v(name)} required />
    </Field>
  );
  return (
    <form key={state ? JSON.stringify(state.values ?? {}) : "initial"} action={formAction} className="flex flex-col gap-5">
      <Feedback look="box" result={state} />
      {initial.id ? <input type="hidden" name="id" value={initial.id} /> : null}
      <div className="grid gap-5 sm:grid-cols-2">
        <Field label="Kit name" hint="For you: e.g. “Long lens on the equatorial mount”." error={err("name")} required>
          <Input name="name" defaultValue={v("name")} required maxLength={80} />
        </Field>
        <Field label="Camera" hint="Make and model." error={err("camera")} required>
          <Input name="camera" defaultValue={v("camera")} required maxLength={80} />
        </Field>
        {num("sensorWidthMm", "Sensor width (mm)", "The long side of the sensor.")}
        {num("sensorHeightMm", "Sensor height (mm)", "The short side.")}
        {num("pixelPitchUm", "Pixel pitch (µm)", "Distance between pixel centres.")}
        {num("focalMm", "Focal length (mm)", "Of the lens or telescope alone.")}
        {num("teleconverter", "Teleconverter factor", "1 without one; 1.4 or 2 with.")}
        {num("fNumber", "f-number", "Of the lens alone; the teleconverter is applied for you.")}
        <Field
          label="Mount"
          error={err("mount")}
          hint="It tells a reduction where north is in the image: an equatorial mount keeps it fixed, a levelled tripod or alt-azimuth mount keeps the zenith up. Hand-held and stabilised cameras say nothing, so alignment on the Sun must estimate north from the Moon's motion, which a bracket of a few seconds rarely allows; give the north angle on the bracket set's page when you know it."
        >
          <Select name="mount" defaultValue={v("mount")} options={MOUNT_OPTIONS} />
        </Field>
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-1 font-medium">Image flips</legend>
          <Checkbox name="flipHorizontal" label="Mirrored left to right" defaultChecked={checked("flipHorizontal")} hint="A diagonal mirror or a star diagonal does this." />
          <Checkbox name="flipVertical" label="Upside down" defaultChecked={checked("flipVertical")} />
        </fieldset>
      </div>
      <Field label="Notes" error={err("notes")}>
        <Textarea name="notes" defaultValue={v("notes")} rows={3} maxLength={2000} />
      </Field>
      <div>
        <SubmitButton>{submitLabel}</SubmitButton>
      </div>
    </form>
  );
}
