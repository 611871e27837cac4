import Link from "next/link";
import { PageTitle } from "@/components/page-title";

export default function NotFound() {
  return (
    <div className="max-w-xl">
      <PageTitle title="Nothing here" lead="This address does not lead to a page." />
      <Link href="/">Back to the start</Link>
    </div>
  );
}
