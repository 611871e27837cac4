// File names of an edition's exports, from a template. Pure. A name keeps
// only ASCII letters, digits, hyphen, underscore and dot; it never starts with
// a dot; it fits a length limit; and names are unique within an edition, so
// any file system and any layout program takes them.
export const FILE_NAME_FIELDS = ["date", "time", "observer", "version", "slot", "position", "title"] as const;
export type FileNameField = (typeof FILE_NAME_FIELDS)[number];
export const DEFAULT_FILE_NAME_TEMPLATE = "{date}_{time}_{observer}_v{version}_{slot}";
export const MAX_FILE_NAME_LENGTH = 100;

export type FileNameValues = Partial<Record<FileNameField, string | number | null | undefined>>;

/** Accents folded to ASCII, anything else outside [A-Za-z0-9._-] becomes a hyphen; runs collapse. */
export function safePart(value: string): string {
  return value
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/ß/g, "ss")
    .replace(/[æÆ]/g, "ae")
    .replace(/[øØ]/g, "o")
    .replace(/[^A-Za-z0-9._-]+/g, "-")
    .replace(/-{2,}/g, "-")
    .replace(/\.{2,}/g, ".")
    .replace(/^[-._]+|[-._]+$/g, "");
}

/** Checks a template: known fields only, and at least one. */
export function checkTemplate(template: string): string | null {
  const fields = [...template.matchAll(/\{([^}]*)\}/g)].map((m) => m[1]);
  if (fields.length === 0) return "the template needs at least one field, such as {date}";
  const unknown = fields.filter((f) => !(FILE_NAME_FIELDS as readonly string[]).includes(f));
  if (unknown.length) return `unknown field${unknown.length > 1 ? "s" : ""} ${unknown.map((f) => `{${f}}`).join(", ")}; expected ${FILE_NAME_FIELDS.map((f) => `{${f}}`).join(", ")}`;
  return null;
}

/** One base name (without extension) from the template. */
export function renderBaseName(template: string, values: FileNameValues): string {
  const problem = checkTemplate(template);
  if (problem) throw new RangeError(problem);
  const filled = template.replace(/\{([^}]*)\}/g, (_m, key: FileNameField) => {
    const v = values[key];
    return v === null || v === undefined ? "" : safePart(String(v));
  });
  const base = safePart(filled).replace(/([_-])[_-]+/g, "$1");
  return base || "plate";
}

/**
 * Names for every file of an edition: base names from the template, cut to the
 * length limit with the extension kept, and a counter (-2, -3, ...) where two
 * would be equal (compared without case, as some file systems do).
 */
export function buildFileNames(template: string, entries: { values: FileNameValues; extension: string }[], maxLength = MAX_FILE_NAME_LENGTH): string[] {
  const taken = new Set<string>();
  return entries.map(({ values, extension }) => {
    const ext = safePart(extension.replace(/^\.+/, "")).toLowerCase();
    const suffix = ext ? `.${ext}` : "";
    const base = renderBaseName(template, values);
    for (let n = 1; ; n++) {
      const counter = n === 1 ? "" : `-${n}`;
      const room = maxLength - suffix.length - counter.length;
      if (room < 1) throw new RangeError(`maxLength ${maxLength} leaves no room for a name`);
      const stem = base.slice(0, room).replace(/[-._]+$/, "") || "plate";
      const name = `${stem}${counter}${suffix}`;
      if (!taken.has(name.toLowerCase())) {
        taken.add(name.toLowerCase());
        return name;
      }
    }
  });
}

/** True when a name keeps every rule. */
export function isSafeFileName(name: string, maxLength = MAX_FILE_NAME_LENGTH): boolean {
  return name.length > 0 && name.length <= maxLength && /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/.test(name);
}
