"use client";
import { useState, type FormEvent } from "react";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { authClient } from "./auth-client";
import { describeAuthError } from "./auth-errors";
import { DISPLAY_NAME_MAX, DISPLAY_NAME_MIN } from "@/lib/auth/display-name";
import { Feedback } from "@/components/ui/feedback";

export function SignUpForm() {
  const [error, setError] = useState("");
  const [sentTo, setSentTo] = useState("");
  const [pending, setPending] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const email = String(form.get("email") ?? "").trim();
    const password = String(form.get("password") ?? "");
    if (password !== String(form.get("confirm") ?? "")) {
      setError("The two passwords differ.");
      return;
    }
    setPending(true);
    setError("");
    const { error } = await authClient.signUp.email({
      name: String(form.get("name") ?? "").trim(),
      email,
      password,
      callbackURL: "/welcome",
    });
    setPending(false);
    if (error) setError(describeAuthError(error));
    else setSentTo(email);
  }

  if (sentTo) {
    return (
      <Feedback look="box" success={`Almost there: we sent a confirmation link to ${sentTo}. Open it to finish signing up.`} />
    );
  }

  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4">
      <Feedback look="box" problem={error} />
      <Field label="Name" hint="As it should appear in photo credits.">
        <Input name="name" autoComplete="name" required minLength={DISPLAY_NAME_MIN} maxLength={DISPLAY_NAME_MAX} />
      </Field>
      <Field label="E-mail">
        <Input name="email" type="email" autoComplete="email" required />
      </Field>
      <Field label="Password" hint="At least 10 characters, and not a common password.">
        <Input name="password" type="password" autoComplete="new-password" required minLength={10} maxLength={128} />
      </Field>
      <Field label="Password again">
        <Input name="confirm" type="password" autoComplete="new-password" required minLength={10} maxLength={128} />
      </Field>
      <ScriptSubmitButton variant="primary" pending={pending} pendingLabel="Creating your account…">
        Create account
      </ScriptSubmitButton>
    </form>
  );
}
