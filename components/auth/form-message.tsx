import type { ReactNode } from "react";

/** A message above a form: announced politely (role=status) or assertively for errors (role=alert). */
export function FormMessage({ tone, children }: { tone: "ok" | "danger"; children: ReactNode }) {
  return (
    <p
      role={tone === "danger" ? "alert" : "status"}
      className={
        tone === "danger"
          ? "rounded-control border border-danger/50 bg-danger/10 px-3 py-2 text-danger"
          : "rounded-control border border-ok/50 bg-ok/10 px-3 py-2 text-ok"
      }
    >
      {children}
    </p>
  );
}
