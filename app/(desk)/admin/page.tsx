import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";

export const metadata: Metadata = { title: "Admin" };

const AREAS = [
  { href: "/admin/people", title: "People", text: "Everyone with an account; grant and revoke roles." },
  { href: "/admin/eclipses", title: "Eclipse catalogue", text: "Name and feature eclipses of the computed catalogue." },
  { href: "/admin/settings", title: "Society settings", text: "Name, default licence and credit line." },
];

export default async function AdminPage() {
  await requirePagePermission("people:list", "/admin");
  return (
    <>
      <PageTitle title="Admin" />
      <ul className="grid gap-4 sm:grid-cols-3">
        {AREAS.map((a) => (
          <li key={a.href}>
            <Link href={a.href} className="block rounded-card border border-line bg-surface-raised p-5 no-underline hover:bg-surface-hover">
              <span className="block text-lg font-semibold text-ink">{a.title}</span>
              <span className="mt-1 block text-ink-muted">{a.text}</span>
            </Link>
          </li>
        ))}
      </ul>
    </>
  );
}
