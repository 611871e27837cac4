// The credit line printed under a plate, filled from the society's template.
// Placeholders are {name}; an unknown one is refused rather than printed, so
// a typo in the settings never reaches the public.

export const CREDIT_PLACEHOLDERS = ["acquiredBy", "processedBy", "society", "year", "licence"] as const;
export type CreditPlaceholder = (typeof CREDIT_PLACEHOLDERS)[number];
export type CreditValues = Partial<Record<CreditPlaceholder, string>>;

/**
 * Names in words for the two credits, which the settings page offers: {observer}
 * is {acquiredBy}, {processing} is {processedBy}. Templates written with either
 * name work.
 */
export const CREDIT_PLACEHOLDER_WORDS: Record<string, CreditPlaceholder> = { observer: "acquiredBy", processing: "processedBy" };
const OFFERED = ["observer", "processing", "society", "year", "licence"];
const resolve = (name: string): CreditPlaceholder | undefined =>
  CREDIT_PLACEHOLDER_WORDS[name] ?? ((CREDIT_PLACEHOLDERS as readonly string[]).includes(name) ? (name as CreditPlaceholder) : undefined);

export const DEFAULT_CREDIT_TEMPLATE = "{acquiredBy} / {society}; processing: {processedBy}";

const TOKEN = /\{([^{}]*)\}/g;

/** Problems with a template: unknown placeholders and unbalanced braces. Empty when it is usable. */
export function checkCreditTemplate(template: string): string[] {
  const problems: string[] = [];
  for (const m of template.matchAll(TOKEN)) {
    if (!resolve(m[1])) {
      problems.push(`unknown placeholder {${m[1]}}; use ${OFFERED.map((p) => `{${p}}`).join(", ")}`);
    }
  }
  const rest = template.replace(TOKEN, "");
  if (/[{}]/.test(rest)) problems.push("a brace without its partner");
  return problems;
}

/**
 * Fills `template` with `values`. Throws on an unknown placeholder or a stray
 * brace; a known placeholder without a value is refused too, because a credit
 * line with a hole in it names nobody.
 */
export function buildCreditLine(template: string, values: CreditValues): string {
  const problems = checkCreditTemplate(template);
  if (problems.length) throw new Error(`The credit-line template "${template}" has ${problems.join("; ")}.`);
  return template
    .replace(TOKEN, (_, name: string) => {
      const v = values[resolve(name)!]?.trim();
      if (!v) throw new Error(`The credit line needs a value for {${name}}.`);
      return v;
    })
    .replace(/\s+/g, " ")
    .trim();
}
