// The words a page shows a person must be ours, never the code's: no field
// keys from our zod schemas (exposureS, altText), no command-line flags
// (--register sun), no event or job codes (plate.created), no raw state slugs
// (awaiting-review), no "(received ...)" from a validation error. Every e2e
// journey calls expectPeopleWording on each page it visits; the patterns are
// checked by tests/unit/wording.test.ts.
import fs from "node:fs";
import path from "node:path";
import type { Page } from "playwright-core";

/** camelCase keys of every zod object in lib/, app/ and components/: field names people must never read. */
export function schemaFieldKeys(root = process.cwd()): Set<string> {
  const keys = new Set<string>();
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(p);
      else if (/\.tsx?$/.test(entry.name)) {
        const text = fs.readFileSync(p, "utf8");
        if (!text.includes("z.object")) continue;
        for (const m of text.matchAll(/^\s+([a-z]+[A-Z][A-Za-z0-9]*)\??:/gm)) keys.add(m[1]);
      }
    }
  };
  for (const top of ["lib", "app", "components"]) walk(path.join(root, top));
  return keys;
}

/** Dotted tokens that are prose, not codes: file names, e-mail addresses, web addresses, abbreviations. */
const DOTTED_ALLOWED = /^(?:.+\.(?:pdf|txt|json|png|jpe?g|fits?|fit|tiff?|zip|csv|ics|dzi|icc|icm|gpx|cr2|cr3|nef|arw|raf|orf|dng|xmp|md)|e\.g|i\.e|.+\.(?:example|org|com|net|io|uk|de|es|eg|tn)|vs\.)$/i;

export interface WordingFinding {
  kind: "field key" | "flag" | "event code" | "state slug" | "received";
  text: string;
}

/** What in `text` reads as developer wording. Pure: tested on its own. */
export function findDeveloperWording(text: string, fieldKeys: Set<string>): WordingFinding[] {
  const found: WordingFinding[] = [];
  // Web addresses and e-mail addresses may contain anything: take them out first.
  const prose = text.replace(/\bhttps?:\/\/\S+/g, " ").replace(/\S+@\S+/g, " ");
  for (const m of prose.matchAll(/\b[a-z]+[A-Z][A-Za-z0-9]*\b/g)) if (fieldKeys.has(m[0])) found.push({ kind: "field key", text: m[0] });
  for (const m of prose.matchAll(/(?:^|\s)(--[a-z][a-z-]*)/g)) found.push({ kind: "flag", text: m[1] });
  for (const m of prose.matchAll(/\b[a-z]+(?:\.[a-z][a-z-]*)+\b/g)) {
    // A sentence end followed by a lower-case word needs a space; "plate.created" has none.
    if (!DOTTED_ALLOWED.test(m[0])) found.push({ kind: "event code", text: m[0] });
  }
  for (const m of prose.matchAll(/\b(?:awaiting-review|changes-requested|request-changes|withdrawn-temporary|withdrawn-permanent|all-rights-reserved)\b/g)) found.push({ kind: "state slug", text: m[0] });
  for (const m of prose.matchAll(/\(received [^)]*\)/g)) found.push({ kind: "received", text: m[0] });
  return found;
}

let keysCache: Set<string> | null = null;

/** Everything a person reads or hears on the page: visible text, and labels, titles, placeholders and alternative texts. */
export async function readPersonText(page: Page): Promise<string> {
  return page.evaluate(() => {
    const parts = [document.title, document.body.innerText];
    for (const el of Array.from(document.querySelectorAll("[aria-label], [title], [placeholder], img[alt], [aria-roledescription]"))) {
      for (const a of ["aria-label", "title", "placeholder", "alt", "aria-roledescription"]) {
        const v = el.getAttribute(a);
        if (v) parts.push(v);
      }
    }
    return parts.join("\n");
  });
}

/** Fails with the page's address and what was found, naming each token. */
export async function expectPeopleWording(page: Page): Promise<void> {
  keysCache ??= schemaFieldKeys();
  const found = findDeveloperWording(await readPersonText(page), keysCache);
  if (found.length) {
    const list = [...new Set(found.map((f) => `${f.kind} "${f.text}"`))].join(", ");
    throw new Error(`${page.url()} shows developer wording: ${list}`);
  }
}

/** True when the page scrolls sideways at its current width (the document is wider than the window). */
export async function scrollsSideways(page: Page): Promise<boolean> {
  return page.evaluate(() => document.documentElement.scrollWidth > document.documentElement.clientWidth + 1);
}
