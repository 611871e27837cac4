import type { ReactNode } from "react";

/** A titled part of a long page: a section labelled by its own h2 (for screen readers' landmarks). */
export function PageSection({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="mt-10">
      <h2 id={id} className="mb-4 text-xl font-semibold">
        {title}
      </h2>
      {children}
    </section>
  );
}
