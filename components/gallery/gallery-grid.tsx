"use client";
// The gallery's grid: the first page comes rendered from the server, later pages
// from /api/plates as the visitor scrolls (or presses "More plates"), with the
// same filters, as one TanStack infinite query. Works without JavaScript up to
// the first page. The page keys this component by its filters, so new filters
// start a new list.
import { useInfiniteQuery } from "@tanstack/react-query";
import { useEffect, useRef } from "react";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { fetchJson } from "@/lib/http/client-fetch";
import type { PlateCardDto } from "@/lib/plates/public";
import { PlateCard } from "./plate-card";

interface PlatesPage {
  plates: PlateCardDto[];
  nextCursor: string | null;
}

export function GalleryGrid({ initial, nextCursor, query }: { initial: PlateCardDto[]; nextCursor: string | null; query: string }) {
  const list = useInfiniteQuery({
    queryKey: ["plates", query],
    queryFn: ({ pageParam, signal }) => {
      const params = new URLSearchParams(query);
      if (pageParam) params.set("cursor", pageParam);
      return fetchJson<PlatesPage>(`/api/plates?${params}`, { signal });
    },
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
    initialData: { pages: [{ plates: initial, nextCursor }], pageParams: [null] },
    // Published plates do not need reading again while the visitor scrolls: only the next page is fetched.
    staleTime: Infinity,
  });
  const plates = list.data.pages.flatMap((p) => p.plates);
  const { hasNextPage, isFetchingNextPage, fetchNextPage } = list;
  const loadMore = () => {
    if (hasNextPage && !isFetchingNextPage) void fetchNextPage();
  };
  const sentinel = useRef<HTMLDivElement>(null);

  useEffect(() => {
    const el = sentinel.current;
    if (!el || !hasNextPage) return;
    const io = new IntersectionObserver((entries) => entries.some((e) => e.isIntersecting) && loadMore(), { rootMargin: "600px" });
    io.observe(el);
    return () => io.disconnect();
  });

  return (
    <div className="flex flex-col gap-6">
      <ul className="grid gap-6 sm:grid-cols-2 lg:grid-cols-3" aria-label="Plates">
        {plates.map((p) => (
          <PlateCard key={p.slug} plate={p} />
        ))}
      </ul>
      <div ref={sentinel} />
      <p role="status" aria-live="polite" className="text-sm text-ink-muted">
        {isFetchingNextPage ? "Loading more plates…" : `${plates.length} plate${plates.length === 1 ? "" : "s"} shown${hasNextPage ? "" : ", all that match"}.`}
      </p>
      <Feedback problem={list.isFetchNextPageError && list.error ? `More plates could not be loaded. ${list.error.message}` : null} />
      {hasNextPage ? (
        <div>
          <Button onClick={loadMore} pending={isFetchingNextPage} pendingLabel="Loading…">
            More plates
          </Button>
        </div>
      ) : null}
    </div>
  );
}
