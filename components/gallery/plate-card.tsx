import Link from "next/link";
import type { PlateCardDto } from "@/lib/plates/public";

/** One plate in a grid: its preview, title, caption, where and by whom. */
export function PlateCard({ plate }: { plate: PlateCardDto }) {
  return (
    <li className="group flex flex-col overflow-hidden rounded-card border border-line bg-surface-raised">
      <Link href={`/plates/${plate.slug}`} className="flex flex-col no-underline">
        {/* eslint-disable-next-line @next/next/no-img-element -- a small static preview served from storage */}
        <img src={plate.previewUrl} alt={plate.altText} loading="lazy" decoding="async" className="aspect-[4/3] w-full bg-black object-cover" />
        <span className="flex flex-col gap-1 p-4">
          <span className="text-lg font-semibold text-ink group-hover:text-accent">{plate.title}</span>
          {plate.caption ? <span className="text-sm text-ink-muted">{plate.caption}</span> : null}
          <span className="mt-1 text-xs text-ink-muted">
            {plate.eclipseId} · {plate.isComposite ? "composite" : (plate.siteCountry ?? "site not given")} · {plate.photographer}
          </span>
        </span>
      </Link>
    </li>
  );
}
