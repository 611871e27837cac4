import Link from "next/link";
import type { PublicPlateDto } from "@/lib/plates/public";
import { PlateDetails } from "./plate-details";
import { PlateImage } from "./plate-image";
import { ReportPlateForm } from "./report-plate-form";
import { formatDate } from "@/lib/format/dates";

/** A plate's page: the zoomable image, then what it shows and how it was made. A withdrawn plate keeps everything but the image. */
export function PlatePage({ plate, society, credit }: { plate: PublicPlateDto; society: string; credit: string }) {
  return (
    <article className="flex flex-col gap-8">
      <header className="flex flex-col gap-2">
        <p className="font-mono text-sm uppercase tracking-widest text-accent">
          <Link href="/gallery">Gallery</Link> · {plate.eclipseId}
        </p>
        <h1 className="text-3xl font-semibold tracking-tight sm:text-4xl">{plate.title}</h1>
        {plate.caption ? <p className="max-w-3xl text-lg text-ink-muted">{plate.caption}</p> : null}
        {!plate.isCurrentVersion ? (
          <p className="rounded-control border border-warn/50 bg-warn/10 p-3 text-sm">
            This is version {plate.version}, kept at its permanent link. <Link href={`/plates/${plate.slug}`}>See the current version.</Link>
          </p>
        ) : null}
      </header>
      {plate.withdrawn ? (
        <section role="note" className="rounded-card border border-danger p-5">
          <h2 className="text-lg font-semibold">{plate.withdrawn.kind === "temporary" ? "This plate is withdrawn while a question is looked at" : "This plate has been withdrawn"}</h2>
          <p className="mt-2">
            Withdrawn on {formatDate(plate.withdrawn.at)}. Reason: {plate.withdrawn.reason || "not given"}. Its record stays here; the image is{" "}
            {plate.withdrawn.kind === "temporary" ? "not shown until the curators have decided." : "no longer shown."}
          </p>
        </section>
      ) : (
        <PlateImage plate={plate} />
      )}
      <PlateDetails plate={plate} society={society} credit={credit} />
      <ReportPlateForm slug={plate.slug} title={plate.title} />
    </article>
  );
}
