// How eclipses are named to people: the date written out (the society's way,
// in UTC, since an eclipse date is the date of greatest eclipse in UTC) and the kind.

const DATE = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" });

/** "2027-08-02" -> "2 August 2027". */
export function formatEclipseDate(id: string): string {
  return DATE.format(new Date(`${id}T12:00:00Z`));
}

const KIND_TITLES = { total: "Total", annular: "Annular", hybrid: "Hybrid", partial: "Partial" } as const;

/** "Total solar eclipse of 2 August 2027". */
export function describeEclipse(e: { id: string; kind: keyof typeof KIND_TITLES }): string {
  return `${KIND_TITLES[e.kind]} solar eclipse of ${formatEclipseDate(e.id)}`;
}
