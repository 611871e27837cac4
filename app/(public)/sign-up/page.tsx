import type { Metadata } from "next";
import Link from "next/link";
import { SignUpForm } from "@/components/auth/sign-up-form";
import { PageTitle } from "@/components/page-title";

export const metadata: Metadata = { title: "Create an account" };

export default function SignUpPage() {
  return (
    <div className="mx-auto max-w-md">
      <PageTitle title="Create an account" lead="Join the eclipse section to submit your brackets." />
      <SignUpForm />
      <p className="mt-6 text-sm text-ink-muted">
        Already a member? <Link href="/sign-in">Sign in</Link>.
      </p>
    </div>
  );
}
