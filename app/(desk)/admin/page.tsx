import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { LinkCards } from "@/components/link-cards";
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
      <LinkCards cards={AREAS} />
    </>
  );
}
