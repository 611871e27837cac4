"use client";
import Link from "next/link";
import { useState, type FormEvent } from "react";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { authClient } from "./auth-client";
import { describeAuthError } from "./auth-errors";
import { Feedback } from "@/components/ui/feedback";

export function ResetPasswordForm({ token, linkError }: { token?: string; linkError?: string }) {
  const [error, setError] = useState(linkError ? describeAuthError({ code: linkError }) : "");
  const [done, setDone] = useState(false);
  const [pending, setPending] = useState(false);

  if (!token) {
    return (
      <Feedback
        look="box"
        problem={
          <>
            {error || "This page needs the link from the e-mail."} <Link href="/forgot-password">Ask for a new link.</Link>
          </>
        }
      />
    );
  }

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const newPassword = String(form.get("password") ?? "");
    if (newPassword !== String(form.get("confirm") ?? "")) {
      setError("The two passwords differ.");
      return;
    }
    setPending(true);
    setError("");
    const { error } = await authClient.resetPassword({ newPassword, token });
    setPending(false);
    if (error) setError(describeAuthError(error));
    else setDone(true);
  }

  if (done) {
    return (
      <Feedback
        look="box"
        success={
          <>
            Your password is changed. <Link href="/sign-in">Sign in with it.</Link>
          </>
        }
      />
    );
  }
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4">
      <Feedback look="box" problem={error} />
      <Field label="New password" hint="At least 10 characters, and not a common password.">
        <Input name="password" type="password" autoComplete="new-password" required minLength={10} maxLength={128} />
      </Field>
      <Field label="New password again">
        <Input name="confirm" type="password" autoComplete="new-password" required minLength={10} maxLength={128} />
      </Field>
      <ScriptSubmitButton variant="primary" pending={pending} pendingLabel="Saving…">
        Save the new password
      </ScriptSubmitButton>
    </form>
  );
}
