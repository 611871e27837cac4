"use client";
// The gallery's grid: the first page comes rendered from the server, later pages
// from /api/plates as the visitor scrolls (or presses "More plates"), with the
// same filters. Works without JavaScript up to the first page. The page keys
// this component by its filters, so new filters start a new list.
import { useEffect, useRef, useState } from "react";
import type { PlateCardDto } from "@/lib/plates/public";
import { Button } from "@/components/ui/button";
import { PlateCard } from "./plate-card";

export function GalleryGrid({ initial, nextCursor, query }: { initial: PlateCardDto[]; nextCursor: string | null; query: string }) {
  const [plates, setPlates] = useState(initial);
  const [cursor, setCursor] = useState(nextCursor);
  const [loading, setLoading] = useState(false);
  const [error, setError] = useState("");
  const sentinel = useRef<HTMLDivElement>(null);

  async function loadMore() {
    if (!cursor || loading) return;
    setLoading(true);
    setError("");
    try {
      const params = new URLSearchParams(query);
      params.set("cursor", cursor);
      const res = await fetch(`/api/plates?${params}`);
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      const page = (await res.json()) as { plates: PlateCardDto[]; nextCursor: string | null };
      setPlates((p) => [...p, ...page.plates]);
      setCursor(page.nextCursor);
    } catch (err) {
      setError(`More plates could not be loaded: ${(err as Error).message}.`);
    } finally {
      setLoading(false);
    }
  }

  useEffect(() => {
    const el = sentinel.current;
    if (!el || !cursor) return;
    const io = new IntersectionObserver((entries) => entries.some((e) => e.isIntersecting) && void loadMore(), { rootMargin: "600px" });
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
        {loading ? "Loading more plates…" : `${plates.length} plate${plates.length === 1 ? "" : "s"} shown${cursor ? "" : ", all that match"}.`}
      </p>
      {error ? (
        <p role="alert" className="text-sm font-medium text-danger">
          {error}
        </p>
      ) : null}
      {cursor ? (
        <div>
          <Button onClick={() => void loadMore()} pending={loading} pendingLabel="Loading…">
            More plates
          </Button>
        </div>
      ) : null}
    </div>
  );
}
