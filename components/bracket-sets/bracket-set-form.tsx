"use client";
import { useActionState } from "react";
import { Feedback } from "@/components/ui/feedback";
import type { FormAction } from "@/lib/http/action-result";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select, type SelectOption } from "@/components/ui/select";
import { SubmitButton } from "@/components/ui/submit-button";
import { Textarea } from "@/components/ui/textarea";

export type BracketSetFormProps = {
  action: FormAction;
  eclipses: SelectOption[];
  sites: SelectOption[];
  kits: SelectOption[];
  defaultEclipseId: string;
};

/** A new bracket set: which eclipse, from where, with which kit. Frames are added on the set's page. */
export function BracketSetForm({ action, eclipses, sites, kits, defaultEclipseId }: BracketSetFormProps) {
  const [state, formAction] = useActionState(action, null);
  const err = (f: string) => state?.fields?.find((x) => x.field === f)?.message;
  const v = (name: string, fallback = "") => state?.values?.[name] ?? fallback;
  return (
    <form key={state ? JSON.stringify(state.values ?? {}) : "initial"} action={formAction} className="flex max-w-2xl flex-col gap-5">
      <Feedback look="box" result={state} />
      <Field label="Name" hint="For example “Second contact, 400 mm refractor”." error={err("name")} required>
        <Input name="name" defaultValue={v("name")} required minLength={2} maxLength={120} />
      </Field>
      <Field label="Eclipse" error={err("eclipseId")} required>
        <Select name="eclipseId" options={eclipses} defaultValue={v("eclipseId", defaultEclipseId)} required />
      </Field>
      <Field label="Site" hint="Where the frames were taken; a ship or aircraft site carries its track." error={err("siteId")} required>
        <Select name="siteId" options={sites} placeholder="Choose a site" defaultValue={v("siteId", sites[0]?.value ?? "")} required />
      </Field>
      <Field label="Kit" hint="Camera and optics; gives the plate scale and the image orientation." error={err("kitId")}>
        <Select name="kitId" options={kits} placeholder="No kit" defaultValue={v("kitId", kits[0]?.value ?? "")} />
      </Field>
      <Field
        label="Camera clock offset (s)"
        hint="How far the camera clock ran ahead of true UTC; negative when it was behind. You can also set it later from a frame that shows a trusted clock."
        error={err("clockOffsetS")}
      >
        <Input name="clockOffsetS" type="number" step="any" inputMode="decimal" defaultValue={v("clockOffsetS", "0")} />
      </Field>
      <Field label="Notes" hint="Conditions, filters, anything a curator should know." error={err("notes")}>
        <Textarea name="notes" defaultValue={v("notes")} maxLength={4000} />
      </Field>
      <div>
        <SubmitButton pendingLabel="Creating…">Create bracket set</SubmitButton>
      </div>
    </form>
  );
}
