import type { ReactNode } from "react";

export function PageTitle({ title, lead, children }: { title: ReactNode; lead?: ReactNode; children?: ReactNode }) {
  return (
    <div className="mb-8 flex flex-wrap items-end justify-between gap-4">
      <div className="max-w-3xl">
        <h1 className="text-3xl font-semibold tracking-tight text-ink">{title}</h1>
        {lead ? <p className="mt-2 text-lg text-ink-muted">{lead}</p> : null}
      </div>
      {children}
    </div>
  );
}
