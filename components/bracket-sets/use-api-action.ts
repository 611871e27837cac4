"use client";
import { useRouter } from "next/navigation";
import { useState } from "react";

export type ActionMessage = { tone: "ok" | "danger"; text: string; field?: string };

/**
 * One call to a route handler from a control: pending while it runs, the
 * server's own message when refused, a confirmation when done, and the page's
 * server data re-read afterwards.
 */
export function useApiAction() {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<ActionMessage | null>(null);
  async function run<T>(work: () => Promise<T>, done: (result: T) => string): Promise<void> {
    setPending(true);
    setMessage(null);
    try {
      const result = await work();
      setMessage({ tone: "ok", text: done(result) });
      router.refresh();
    } catch (err) {
      setMessage({ tone: "danger", text: (err as Error).message });
    } finally {
      setPending(false);
    }
  }
  return { pending, message, setMessage, run };
}
