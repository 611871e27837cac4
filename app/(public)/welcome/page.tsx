import type { Metadata } from "next";
import Link from "next/link";
import { redirect } from "next/navigation";
import { currentActor } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { buttonClasses } from "@/components/ui/button";

export const metadata: Metadata = { title: "Welcome" };

// Where the confirmation link lands: the address is confirmed and the person signed in.
export default async function WelcomePage() {
  const actor = await currentActor();
  if (!actor) redirect("/sign-in");
  return (
    <div className="mx-auto max-w-xl">
      <PageTitle title={`Welcome, ${actor.name}`} lead="Your address is confirmed and you are signed in." />
      <Link href="/studio" className={buttonClasses({ variant: "primary" })}>
        Go to your studio
      </Link>
    </div>
  );
}
