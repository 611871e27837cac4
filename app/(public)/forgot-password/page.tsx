import type { Metadata } from "next";
import { ForgotPasswordForm } from "@/components/auth/forgot-password-form";
import { PageTitle } from "@/components/page-title";

export const metadata: Metadata = { title: "Forgotten password" };

export default function ForgotPasswordPage() {
  return (
    <div className="mx-auto max-w-md">
      <PageTitle title="Forgotten password" lead="We will e-mail you a link to choose a new one." />
      <ForgotPasswordForm />
    </div>
  );
}
