import Link from "next/link";

/** A row of large links, each with a line saying what is behind it. */
export function LinkCards({ cards }: { cards: { href: string; title: string; text: string }[] }) {
  return (
    <ul className="grid gap-4 sm:grid-cols-3">
      {cards.map((c) => (
        <li key={c.href}>
          <Link href={c.href} className="block rounded-card border border-line bg-surface-raised p-5 no-underline hover:bg-surface-hover">
            <span className="block text-lg font-semibold text-ink">{c.title}</span>
            <span className="mt-1 block text-ink-muted">{c.text}</span>
          </Link>
        </li>
      ))}
    </ul>
  );
}
