import Link from "next/link";
import { PageTitle } from "@/components/page-title";

export default function Forbidden() {
  return (
    <div className="max-w-xl">
      <PageTitle title="Not for your roles" lead="Your account is signed in, but this page needs a role you do not hold." />
      <p className="text-ink-muted">
        If you think you should have it, ask an administrator of the society. <Link href="/">Back to the start</Link>.
      </p>
    </div>
  );
}
