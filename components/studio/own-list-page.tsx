import Link from "next/link";
import type { ReactNode } from "react";
import { PageTitle } from "@/components/page-title";
import { buttonClasses } from "@/components/ui/button";
import { RecordTable, type RecordColumn } from "@/components/ui/record-table";

/**
 * A member's own records of one kind (kits, sites) at /studio/{plural}: the
 * page's title, the way to add one, and the list, or what to do while it is empty.
 */
export function OwnListPage<T extends { id: string }>({
  noun,
  lead,
  emptyMessage,
  columns,
  rows,
}: {
  /** "kit" and "kits": the title, the button, the caption and the empty list are worded with them. */
  noun: { one: string; many: string };
  lead: ReactNode;
  emptyMessage: ReactNode;
  columns: RecordColumn<T>[];
  rows: T[];
}) {
  return (
    <>
      <PageTitle title={noun.many[0].toUpperCase() + noun.many.slice(1)} lead={lead}>
        <Link href={`/studio/${noun.many}/new`} className={buttonClasses({ variant: "primary" })}>
          New {noun.one}
        </Link>
      </PageTitle>
      <RecordTable caption={`Your ${noun.many}`} columns={columns} rows={rows} empty={{ title: `No ${noun.many} yet`, message: emptyMessage }} />
    </>
  );
}
