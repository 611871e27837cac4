import type { Metadata } from "next";
import { ResetPasswordForm } from "@/components/auth/reset-password-form";
import { PageTitle } from "@/components/page-title";

export const metadata: Metadata = { title: "Choose a new password" };

export default async function ResetPasswordPage({ searchParams }: { searchParams: Promise<{ token?: string; error?: string; invited?: string }> }) {
  const { token, error, invited } = await searchParams;
  return (
    <div className="mx-auto max-w-md">
      {/* An invitation's link lands here too: the invited person chooses their first password. */}
      <PageTitle title={invited ? "Choose your password" : "Choose a new password"} />
      <ResetPasswordForm token={token} linkError={error} />
    </div>
  );
}
