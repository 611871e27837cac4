import type { Metadata } from "next";
import { SignInForm } from "@/components/auth/sign-in-form";
import { PageTitle } from "@/components/page-title";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string }> }) {
  const { next } = await searchParams;
  return (
    <div className="mx-auto max-w-md">
      <PageTitle title="Sign in" lead="Members, curators and editors of the society." />
      <SignInForm next={next} />
    </div>
  );
}
