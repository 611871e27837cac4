"use client";
import { useState, type FormEvent } from "react";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { authClient } from "./auth-client";
import { describeAuthError } from "./auth-errors";
import { Feedback } from "@/components/ui/feedback";

export function ForgotPasswordForm() {
  const [error, setError] = useState("");
  const [done, setDone] = useState(false);
  const [pending, setPending] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const email = String(new FormData(e.currentTarget).get("email") ?? "").trim();
    setPending(true);
    setError("");
    const { error } = await authClient.requestPasswordReset({ email, redirectTo: "/reset-password" });
    setPending(false);
    if (error) setError(describeAuthError(error));
    else setDone(true);
  }

  if (done) {
    // The same answer whether or not the address has an account, so the form
    // cannot be used to find out who is a member.
    return <Feedback look="box" success="If that address has an account, a link to set a new password is on its way." />;
  }
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4">
      <Feedback look="box" problem={error} />
      <Field label="E-mail">
        <Input name="email" type="email" autoComplete="email" required />
      </Field>
      <ScriptSubmitButton variant="primary" pending={pending} pendingLabel="Sending…">
        Send me a link
      </ScriptSubmitButton>
    </form>
  );
}
