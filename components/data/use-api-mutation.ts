"use client";
// What a button or a form does to the server, as a TanStack Query mutation:
// pending while the call runs, the server's problem (an ApiProblem) when it is
// refused, the answer when it is done. The page's server-rendered data are
// read again after success, unless the caller goes elsewhere.
import { useMutation } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import type { ApiProblem } from "@/lib/http/client-fetch";

export interface ApiMutationOptions<TData, TVars> {
  onSuccess?: (data: TData, vars: TVars) => void;
  onError?: (problem: ApiProblem, vars: TVars) => void;
  /** Read the page's server data again after success (the default). */
  refresh?: boolean;
}

export function useApiMutation<TData = unknown, TVars = void>(request: (vars: TVars) => Promise<TData>, options: ApiMutationOptions<TData, TVars> = {}) {
  const router = useRouter();
  return useMutation<TData, ApiProblem, TVars>({
    mutationFn: request,
    onSuccess: (data, vars) => {
      options.onSuccess?.(data, vars);
      if (options.refresh !== false) router.refresh();
    },
    onError: (problem, vars) => options.onError?.(problem, vars),
  });
}
