"use client";
import { useActionState } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { SubmitButton } from "@/components/ui/submit-button";
import { Textarea } from "@/components/ui/textarea";
import type { FormAction } from "@/lib/http/action-result";


export function SettingsForm({
  action,
  initial,
  licences,
}: {
  action: FormAction;
  initial: {
    name: string;
    shortName: string;
    defaultLicence: string;
    defaultCreditLine: string;
    creditLineTemplate: string;
    /** One reason a line. */
    changeReasons: string;
    rejectionReasons: string;
  };
  licences: { value: string; label: string }[];
}) {
  const [state, formAction] = useActionState(action, null);
  const err = (f: string) => state?.fields?.find((x) => x.field === f)?.message;
  const v = (name: keyof typeof initial) => state?.values?.[name] ?? initial[name];
  return (
    <form key={state ? JSON.stringify(state.values ?? {}) : "initial"} action={formAction} className="flex max-w-2xl flex-col gap-5">
      <Feedback look="box" result={state} />
      <Field label="Society name" error={err("name")} required>
        <Input name="name" defaultValue={v("name")} required maxLength={120} />
      </Field>
      <Field label="Short name" hint="Used in page titles." error={err("shortName")} required>
        <Input name="shortName" defaultValue={v("shortName")} required maxLength={40} />
      </Field>
      <Field label="Default licence for new plates" hint="Curators can choose another for each plate." error={err("defaultLicence")}>
        <Select name="defaultLicence" defaultValue={v("defaultLicence")} options={licences} />
      </Field>
      <Field label="Default credit line" hint="Printed under every plate unless a curator changes it." error={err("defaultCreditLine")} required>
        <Input name="defaultCreditLine" defaultValue={v("defaultCreditLine")} required maxLength={200} />
      </Field>
      <Field
        label="Credit-line template for plates"
        hint="Placeholders: {observer} (who took the frames), {processing} (who processed them), {society}, {year}, {licence}. The plate editor fills them in."
        error={err("creditLineTemplate")}
        required
      >
        <Input name="creditLineTemplate" defaultValue={v("creditLineTemplate")} required maxLength={200} />
      </Field>
      <Field label="Reasons for asking a photographer for changes" hint="One reason a line, at most 20. Curators pick one with each request." error={err("changeReasons")} required>
        <Textarea name="changeReasons" defaultValue={v("changeReasons")} rows={6} required />
      </Field>
      <Field label="Reasons for rejecting a bracket set" hint="One reason a line, at most 20." error={err("rejectionReasons")} required>
        <Textarea name="rejectionReasons" defaultValue={v("rejectionReasons")} rows={5} required />
      </Field>
      <div>
        <SubmitButton>Save settings</SubmitButton>
      </div>
    </form>
  );
}
