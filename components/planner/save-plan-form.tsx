"use client";
import { useActionState } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { SubmitButton } from "@/components/ui/submit-button";
import type { FormAction } from "@/lib/http/action-result";
import { capitalize, fieldLabel } from "@/lib/field-labels";


export function SavePlanForm({ action, hidden, defaultName }: { action: FormAction; hidden: Record<string, string>; defaultName: string }) {
  const [state, formAction] = useActionState(action, null);
  return (
    <form action={formAction} className="flex flex-wrap items-end gap-3">
      {Object.entries(hidden).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      <Field label="Plan name" className="min-w-64 flex-1">
        <Input name="name" defaultValue={defaultName} maxLength={80} required />
      </Field>
      <SubmitButton variant="secondary">Save this plan</SubmitButton>
      {/* The form has one field of its own: a refusal names each field in the message. */}
      <Feedback
        look="box"
        result={state?.fields?.length ? { ...state, message: state.fields.map((f) => `${f.field === "name" ? "Plan name" : capitalize(fieldLabel(f.field))}: ${f.message}`).join("; ") } : state}
      />
    </form>
  );
}
