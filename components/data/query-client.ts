// How the browser's TanStack Query cache behaves. Every query and mutation goes
// through fetchJson (lib/http/client-fetch.ts), so its errors are ApiProblems:
// registered here, `error` is typed as one everywhere.
import { QueryClient } from "@tanstack/react-query";
import type { ApiProblem } from "@/lib/http/client-fetch";

declare module "@tanstack/react-query" {
  interface Register {
    defaultError: ApiProblem;
  }
}

export function makeQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        // The pages that poll say themselves how to go on after a failed read
        // (components/data/progress-queries.ts); a silent retry would hide it.
        retry: false,
        refetchOnWindowFocus: false,
      },
      mutations: { retry: false },
    },
  });
}
