import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { PeopleTable } from "@/components/people/people-table";
import { buttonClasses } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { getDb } from "@/db/client";
import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";
import { listPeople, peopleQuerySchema } from "@/lib/people/people";
import { fieldProblems, summarizeProblems } from "@/lib/validation";
import { Select } from "@/components/ui/select";
import { InviteForm } from "@/components/people/invite-form";
import { INVITATION_VALID_DAYS } from "@/lib/people/account-state";
import { changeRoleAction, inviteAction, setDisabledAction } from "./actions";

export const metadata: Metadata = { title: "People" };

export default async function PeoplePage({ searchParams }: { searchParams: Promise<Record<string, string>> }) {
  const actor = await requirePagePermission("people:list", "/admin/people");
  const raw = await searchParams;
  // A hand-edited address with a bad filter shows everyone and says which filter was ignored.
  const parsed = peopleQuerySchema.safeParse({ q: raw.q, page: raw.page, role: raw.role, status: raw.status });
  const query = parsed.success ? parsed.data : peopleQuerySchema.parse({ q: typeof raw.q === "string" ? raw.q.slice(0, 100) : "" });
  const ignored = parsed.success ? null : summarizeProblems(fieldProblems(parsed.error, raw));
  const result = await listPeople(getDb(), actor, query);
  const pages = Math.max(1, Math.ceil(result.total / result.pageSize));
  const filters = { ...(query.q ? { q: query.q } : {}), ...(query.role ? { role: query.role } : {}), ...(query.status ? { status: query.status } : {}) };
  const link = (page: number) => `/admin/people?${new URLSearchParams({ ...filters, page: String(page) })}`;
  const filtered = Boolean(query.q || query.role || query.status);

  return (
    <>
      <PageTitle title="People" lead="Everyone with an account, and the roles they hold. Each change is written to the audit log." />
      <details className="mb-8 rounded-card border border-line p-4">
        <summary className="cursor-pointer font-semibold">Invite a person by e-mail</summary>
        <p className="my-3 max-w-prose text-sm text-ink-muted">
          They get an account with the member role and the roles you tick, and a mail with a link to choose their password. The link works for {INVITATION_VALID_DAYS} days.
        </p>
        <InviteForm action={inviteAction} />
      </details>
      <form role="search" aria-label="Find people" className="mb-6 flex flex-wrap items-end gap-3" action="/admin/people">
        <Field label="Find by name or e-mail" className="min-w-0 flex-1 basis-64">
          <Input name="q" type="search" defaultValue={query.q} />
        </Field>
        <Field label="Role" className="min-w-0 basis-48">
          <Select name="role" defaultValue={query.role ?? ""} options={[{ value: "", label: "Any role" }, ...ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }))]} />
        </Field>
        <Field label="Sign-in" className="min-w-0 basis-40">
          <Select name="status" defaultValue={query.status ?? ""} options={[{ value: "", label: "Everyone" }, { value: "active", label: "May sign in" }, { value: "disabled", label: "Disabled" }]} />
        </Field>
        <button type="submit" className={buttonClasses({ variant: "secondary" })}>
          Show
        </button>
        {filtered ? (
          <Link href="/admin/people" className={buttonClasses({ variant: "quiet" })}>
            Clear the filters
          </Link>
        ) : null}
      </form>
      {ignored ? (
        <p role="status" className="mb-4 text-sm text-ink-muted">
          Ignored a filter in the address: {ignored}
        </p>
      ) : null}
      <PeopleTable
        people={result.people}
        caption={`People, page ${result.page} of ${pages} (${result.total} in all)`}
        emptyText={filtered ? "No one matches these filters." : "No one has an account yet."}
        selfId={actor.userId}
        changeRole={changeRoleAction}
        setDisabled={setDisabledAction}
      />
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
