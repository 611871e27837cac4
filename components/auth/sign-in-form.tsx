"use client";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { safeNextPath } from "@/lib/http/safe-next";
import { authClient } from "./auth-client";
import { describeAuthError } from "./auth-errors";
import { Feedback } from "@/components/ui/feedback";

export function SignInForm({ next }: { next?: string }) {
  const router = useRouter();
  const [error, setError] = useState("");
  const [pending, setPending] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setPending(true);
    setError("");
    const { error } = await authClient.signIn.email({
      email: String(form.get("email") ?? ""),
      password: String(form.get("password") ?? ""),
    });
    setPending(false);
    if (error) {
      setError(describeAuthError(error));
      return;
    }
    // Only a plain path on this site is followed, never another origin.
    router.push(safeNextPath(next));
    router.refresh();
  }

  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-4" noValidate={false}>
      <Feedback look="box" problem={error} />
      <Field label="E-mail">
        <Input name="email" type="email" autoComplete="email" required />
      </Field>
      <Field label="Password">
        <Input name="password" type="password" autoComplete="current-password" required />
      </Field>
      <ScriptSubmitButton variant="primary" pending={pending} pendingLabel="Signing in…">
        Sign in
      </ScriptSubmitButton>
      <p className="text-sm text-ink-muted">
        <Link href="/forgot-password">Forgotten your password?</Link> · <Link href="/sign-up">Create an account</Link>
      </p>
    </form>
  );
}
