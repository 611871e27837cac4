import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Select } from "@/components/ui/select";
import type { EclipseFilter } from "@/lib/eclipses/filter";

const KIND_OPTIONS = [
  { value: "", label: "Every kind" },
  { value: "total", label: "Total" },
  { value: "annular", label: "Annular" },
  { value: "hybrid", label: "Hybrid" },
  { value: "partial", label: "Partial" },
];

const WHEN_OPTIONS = [
  { value: "", label: "Coming and past" },
  { value: "coming", label: "Coming" },
  { value: "past", label: "Past" },
];

/** A plain GET form: the filtered list is a shareable address and works without JavaScript. */
export function EclipseFilterForm({ filter }: { filter: EclipseFilter }) {
  return (
    <form method="get" action="/eclipses" role="search" aria-label="Filter eclipses" className="mb-8 flex flex-wrap items-end gap-4">
      <Field label="Kind" className="min-w-40">
        <Select name="kind" defaultValue={filter.kind ?? ""} options={KIND_OPTIONS} />
      </Field>
      <Field label="When" className="min-w-40">
        <Select name="when" defaultValue={filter.when ?? ""} options={WHEN_OPTIONS} />
      </Field>
      <button type="submit" className={buttonClasses({ variant: "primary" })}>
        Show
      </button>
      {filter.kind || filter.when ? (
        <Link href="/eclipses" className="self-center underline">
          Show all
        </Link>
      ) : null}
    </form>
  );
}
