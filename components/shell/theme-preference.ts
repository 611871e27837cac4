/**
 * Where the chosen theme is kept and how it is applied. Shared by the inline
 * script that runs before paint and by the toggle, so the two cannot drift.
 * Dark is the default and needs no attribute; print always renders light (CSS).
 */
export const THEME_STORAGE_KEY = "crownlight-theme";
export const THEME_ATTRIBUTE = "data-theme";

export type Theme = "dark" | "light";

export function isTheme(value: unknown): value is Theme {
  return value === "dark" || value === "light";
}
