import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { RoleSwitch } from "@/components/people/role-switch";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Table, TableBody, TableCell, TableEmptyRow, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { getDb } from "@/db/client";
import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";
import { listPeople, peopleQuerySchema } from "@/lib/people/people";
import { parseInput } from "@/lib/validation";
import { changeRoleAction } from "./actions";
import { formatDate } from "@/lib/format/dates";

export const metadata: Metadata = { title: "People" };

export default async function PeoplePage({ searchParams }: { searchParams: Promise<Record<string, string>> }) {
  const actor = await requirePagePermission("people:list", "/admin/people");
  const raw = await searchParams;
  const query = parseInput(peopleQuerySchema, { q: raw.q, page: raw.page });
  const result = await listPeople(getDb(), actor, query);
  const pages = Math.max(1, Math.ceil(result.total / result.pageSize));
  const link = (page: number) => `/admin/people?${new URLSearchParams({ ...(query.q ? { q: query.q } : {}), page: String(page) })}`;

  return (
    <>
      <PageTitle title="People" lead="Everyone with an account, and the roles they hold. Each change is written to the audit log." />
      <form role="search" className="mb-6 flex flex-wrap items-end gap-3" action="/admin/people">
        <Field label="Find by name or e-mail" className="min-w-72 flex-1">
          <Input name="q" type="search" defaultValue={query.q} />
        </Field>
        <button type="submit" className={buttonClasses({ variant: "secondary" })}>
          Search
        </button>
      </form>
      <Table caption={`People, page ${result.page} of ${pages} (${result.total} in all)`}>
        <TableHead>
          <TableRow>
            <TableHeader>Name</TableHeader>
            <TableHeader>E-mail</TableHeader>
            <TableHeader>Joined</TableHeader>
            <TableHeader>Roles (press to grant or revoke)</TableHeader>
          </TableRow>
        </TableHead>
        <TableBody>
          {result.people.length === 0 ? (
            <TableEmptyRow colSpan={4}>No one matches “{query.q}”.</TableEmptyRow>
          ) : (
            result.people.map((p) => (
              <TableRow key={p.id}>
                <TableCell>
                  {p.name} {p.emailVerified ? null : <Badge tone="warn">address not confirmed</Badge>}
                </TableCell>
                <TableCell className="font-mono text-sm">{p.email}</TableCell>
                <TableCell className="font-mono text-sm">{formatDate(p.joinedAt)}</TableCell>
                <TableCell>
                  <div className="flex flex-wrap gap-2" role="group" aria-label={`Roles of ${p.name}`}>
                    {ROLES.map((role) => (
                      <RoleSwitch
                        key={role}
                        action={changeRoleAction}
                        userId={p.id}
                        role={role}
                        label={ROLE_LABELS[role]}
                        held={p.roles.includes(role)}
                        personName={p.name}
                      />
                    ))}
                  </div>
                </TableCell>
              </TableRow>
            ))
          )}
        </TableBody>
      </Table>
      <nav aria-label="Pages of people" className="mt-4 flex items-center gap-3">
        {result.page > 1 ? (
          <Link href={link(result.page - 1)} className={buttonClasses({ size: "sm" })}>
            Previous page
          </Link>
        ) : null}
        <span className="text-sm text-ink-muted">
          Page {result.page} of {pages}
        </span>
        {result.page < pages ? (
          <Link href={link(result.page + 1)} className={buttonClasses({ size: "sm" })}>
            Next page
          </Link>
        ) : null}
      </nav>
    </>
  );
}
