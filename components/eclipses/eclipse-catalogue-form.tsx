"use client";
import { useActionState } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Badge } from "@/components/ui/badge";
import { Input } from "@/components/ui/input";
import { SubmitButton } from "@/components/ui/submit-button";
import type { FormAction } from "@/lib/http/action-result";
import { formatDate } from "@/lib/format/dates";

export interface CatalogueRow {
  id: string;
  kind: string;
  name: string | null;
  featured: boolean;
}

const KIND_TONE: Record<string, "accent" | "warn" | "neutral"> = { total: "accent", hybrid: "accent", annular: "warn", partial: "neutral" };

/**
 * Every eclipse's name and featured flag in one form with one save: the
 * server checks all rows before writing any, and a refused row keeps what was
 * typed in every row.
 */
export function EclipseCatalogueForm({ action, groups }: { action: FormAction; groups: { title: string; rows: CatalogueRow[] }[] }) {
  const [state, formAction] = useActionState(action, null);
  const typed = state && !state.ok ? state.values : undefined;
  const problem = (id: string) => state?.fields?.find((f) => f.field === `name:${id}` || f.field === `featured:${id}`)?.message;
  const ids = groups.flatMap((g) => g.rows.map((r) => r.id));
  return (
    <form action={formAction} className="flex flex-col gap-6">
      <input type="hidden" name="ids" value={ids.join(",")} />
      {groups.map((g) => (
        <section key={g.title} aria-labelledby={`cat-${g.title}`} className="flex flex-col gap-2">
          <h2 id={`cat-${g.title}`} className="text-xl font-semibold">
            {g.title}
          </h2>
          <ul className="flex flex-col">
            {g.rows.map((e) => {
              const err = problem(e.id);
              return (
                <li key={e.id} className="flex flex-wrap items-center gap-x-4 gap-y-2 border-b border-line py-2">
                  <span className="flex w-44 shrink-0 items-center gap-2">
                    <time dateTime={e.id}>{formatDate(e.id)}</time>
                    <Badge tone={KIND_TONE[e.kind] ?? "neutral"}>{e.kind}</Badge>
                  </span>
                  <label className="sr-only" htmlFor={`name-${e.id}`}>
                    Name of the eclipse of {formatDate(e.id)}
                  </label>
                  <Input
                    id={`name-${e.id}`}
                    name={`name:${e.id}`}
                    defaultValue={typed ? (typed[`name:${e.id}`] ?? "") : (e.name ?? "")}
                    maxLength={120}
                    aria-invalid={err ? true : undefined}
                    aria-describedby={err ? `err-${e.id}` : undefined}
                    className="min-w-0 flex-1 basis-56"
                  />
                  <label className="flex items-center gap-2">
                    <input type="checkbox" name={`featured:${e.id}`} defaultChecked={typed ? typed[`featured:${e.id}`] === "on" : e.featured} /> Featured
                  </label>
                  {err ? (
                    <p id={`err-${e.id}`} className="w-full text-sm font-medium text-danger">
                      {err}
                    </p>
                  ) : null}
                </li>
              );
            })}
          </ul>
        </section>
      ))}
      <div className="sticky bottom-0 flex flex-wrap items-center gap-4 border-t border-line bg-surface py-3">
        <SubmitButton pendingLabel="Saving…">Save the catalogue</SubmitButton>
        <Feedback look="box" result={state} />
      </div>
    </form>
  );
}
