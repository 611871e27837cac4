import type { Metadata } from "next";
import { ResetPasswordForm } from "@/components/auth/reset-password-form";
import { PageTitle } from "@/components/page-title";

export const metadata: Metadata = { title: "Choose a new password" };

export default async function ResetPasswordPage({ searchParams }: { searchParams: Promise<{ token?: string; error?: string }> }) {
  const { token, error } = await searchParams;
  return (
    <div className="mx-auto max-w-md">
      <PageTitle title="Choose a new password" />
      <ResetPasswordForm token={token} linkError={error} />
    </div>
  );
}
