import type { ReactNode } from "react";
import { EmptyState } from "@/components/ui/empty-state";
import { PageTitle } from "@/components/page-title";

/** The first view of a workspace area before it holds any work. */
export function AreaIntro({ title, lead, emptyTitle, emptyMessage, children }: {
  title: string;
  lead: string;
  emptyTitle: string;
  emptyMessage: ReactNode;
  children?: ReactNode;
}) {
  return (
    <>
      <PageTitle title={title} lead={lead} />
      <EmptyState title={emptyTitle} message={emptyMessage} />
      {children}
    </>
  );
}
