import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { QueueTable, type QueueColumn, type QueueColumnKey } from "@/components/review/queue-table";
import { buttonClasses } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import { getDb } from "@/db/client";
import { listReviewQueue, QUEUE_STATES, queueQuerySchema, type QueueQuery } from "@/lib/review/queue";
import { STATE_LABELS } from "@/lib/review/state-machine";
import { fieldProblems, summarizeProblems } from "@/lib/validation";
import { formatDate } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Review desk" };

const COLUMNS: { key: QueueColumnKey; label: string; sortable: boolean }[] = [
  { key: "submitted", label: "Sent", sortable: true },
  { key: "name", label: "Bracket set", sortable: true },
  { key: "photographer", label: "Photographer", sortable: true },
  { key: "eclipse", label: "Eclipse", sortable: true },
  { key: "state", label: "State", sortable: true },
  { key: "frames", label: "Included light frames", sortable: true },
  { key: "reductions", label: "Finished reductions", sortable: false },
  { key: "assigned", label: "In hand of", sortable: false },
];

export default async function ReviewQueuePage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await requirePagePermission("review:use", "/review");
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  // A hand-edited address with a bad filter shows the defaults and says which filter was ignored.
  const parsed = queueQuerySchema.safeParse(raw);
  const query: QueueQuery = parsed.success ? parsed.data : queueQuerySchema.parse({});
  const problems = parsed.success ? [] : fieldProblems(parsed.error, raw);
  const result = await listReviewQueue(getDb(), actor, query);

  const params = (over: Partial<Record<keyof QueueQuery, string | undefined>>) => {
    const merged: Record<string, string | undefined> = {
      state: query.state,
      eclipse: query.eclipse,
      photographer: query.photographer,
      mine: query.mine,
      sort: query.sort,
      dir: query.dir,
      page: String(result.page),
      ...over,
    };
    return new URLSearchParams(Object.entries(merged).filter((e): e is [string, string] => !!e[1])).toString();
  };
  const columns: QueueColumn[] = COLUMNS.map((c) => {
    const active = c.sortable && c.key === query.sort;
    return {
      key: c.key,
      label: c.label,
      direction: active ? (query.dir === "asc" ? "ascending" : "descending") : "none",
      href: c.sortable ? `/review?${params({ sort: c.key, dir: active && query.dir === "asc" ? "desc" : "asc", page: "1" })}` : undefined,
    };
  });
  const tabs = [...QUEUE_STATES.map((s) => ({ value: s, label: STATE_LABELS[s], n: result.counts[s] })), { value: "all" as const, label: "all", n: Object.values(result.counts).reduce((a, b) => a + b, 0) }];

  return (
    <>
      <PageTitle title="Review desk" lead="Bracket sets members have sent for review, and the decisions taken on them. Open a set to look at its frames and reductions and decide.">
        <Link href="/review/plates">Plates: drafts, published, withdrawn, reports</Link>
      </PageTitle>
      <Feedback className="mb-4" problem={problems.length ? `Ignored a filter in the address: ${summarizeProblems(problems)}` : null} />

      <nav aria-label="Sets by state" className="mb-4">
        <ul className="flex flex-wrap gap-2">
          {tabs.map((t) => (
            <li key={t.value}>
              <Link
                href={`/review?${params({ state: t.value, page: "1" })}`}
                aria-current={t.value === query.state ? "page" : undefined}
                className={buttonClasses({ variant: t.value === query.state ? "primary" : "secondary", size: "sm" })}
              >
                {t.label} <span className="font-mono">({t.n})</span>
              </Link>
            </li>
          ))}
        </ul>
      </nav>

      <form role="search" aria-label="Filter the queue" action="/review" className="mb-6 flex flex-wrap items-end gap-3">
        <input type="hidden" name="state" value={query.state} />
        <input type="hidden" name="sort" value={query.sort} />
        <input type="hidden" name="dir" value={query.dir} />
        <Field label="Eclipse">
          <Select name="eclipse" defaultValue={query.eclipse ?? ""} placeholder="Every eclipse" options={result.eclipses.map((e) => ({ value: e, label: formatDate(e) || e }))} />
        </Field>
        <Field label="Photographer">
          <Select name="photographer" defaultValue={query.photographer ?? ""} placeholder="Everyone" options={result.photographers.map((p) => ({ value: p.id, label: p.name }))} />
        </Field>
        <Field label="In hand">
          <Select name="mine" defaultValue={query.mine ?? ""} options={[{ value: "", label: "Anyone's" }, { value: "1", label: "Only mine" }]} />
        </Field>
        <button type="submit" className={buttonClasses({ variant: "secondary" })}>
          Show
        </button>
      </form>

      {result.total === 0 ? (
        <EmptyState title={query.state === "awaiting-review" ? "Nothing waiting for review" : "No bracket sets match"} message="Sets appear here once their photographer sends them for review." />
      ) : (
        <>
          <QueueTable
            rows={result.rows}
            columns={columns}
            caption={`${query.state === "all" ? "All sets on the desk" : `Sets ${STATE_LABELS[query.state]}`}, page ${result.page} of ${result.pageCount} (${result.total} in all)`}
            csvHref={`/api/review/queue.csv?${params({ page: undefined })}`}
          />
          {result.pageCount > 1 ? (
            <nav aria-label="Pages of the queue" className="mt-4 flex items-center gap-4">
              {result.page > 1 ? <Link href={`/review?${params({ page: String(result.page - 1) })}`}>Previous page</Link> : null}
              <span>
                Page {result.page} of {result.pageCount}
              </span>
              {result.page < result.pageCount ? <Link href={`/review?${params({ page: String(result.page + 1) })}`}>Next page</Link> : null}
            </nav>
          ) : null}
        </>
      )}
    </>
  );
}
