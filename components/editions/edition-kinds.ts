/** The kinds of edition, as the forms offer them. */
export const EDITION_KIND_OPTIONS = [
  { value: "newsletter", label: "Newsletter" },
  { value: "journal", label: "Journal" },
];
