"use client";
import { useActionState, useState } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Checkbox } from "@/components/ui/checkbox";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { SubmitButton } from "@/components/ui/submit-button";
import type { FormAction } from "@/lib/http/action-result";

const EXTRA_ROLES = [
  { value: "curator", label: "Curator" },
  { value: "editor", label: "Editor" },
  { value: "admin", label: "Administrator" },
];

/** Invite a person by e-mail: they get an account with the member role (and the roles ticked) and a link to choose a password. */
export function InviteForm({ action }: { action: FormAction }) {
  const [state, formAction] = useActionState(action, null);
  const [roles, setRoles] = useState<string[]>([]);
  const err = (f: string) => (state && !state.ok ? state.fields?.find((x) => x.field === f)?.message : undefined);
  return (
    <form action={formAction} className="flex flex-col gap-4" key={state?.ok ? state.message : "invite"}>
      <Feedback look="box" result={state} />
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Name" required error={err("name")}>
          <Input name="name" autoComplete="off" defaultValue={state && !state.ok ? state.values?.name : undefined} />
        </Field>
        <Field label="E-mail" required error={err("email")}>
          <Input name="email" type="email" autoComplete="off" defaultValue={state && !state.ok ? state.values?.email : undefined} />
        </Field>
      </div>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Roles besides member</legend>
        <div className="flex flex-wrap gap-x-6 gap-y-2">
          {EXTRA_ROLES.map((r) => (
            <Checkbox
              key={r.value}
              label={r.label}
              checked={roles.includes(r.value)}
              onChange={(e) => setRoles((old) => (e.target.checked ? [...old, r.value] : old.filter((x) => x !== r.value)))}
            />
          ))}
        </div>
      </fieldset>
      <input type="hidden" name="roles" value={roles.join(",")} />
      <div>
        <SubmitButton pendingLabel="Sending the invitation…">Send the invitation</SubmitButton>
      </div>
    </form>
  );
}
