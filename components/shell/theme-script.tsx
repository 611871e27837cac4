import { THEME_ATTRIBUTE, THEME_STORAGE_KEY } from "@/components/shell/theme-preference";

// Runs before first paint so a daylight user never sees a dark flash. Storage can
// throw (private modes, blocked cookies): the default theme is then kept.
const SCRIPT = `(function(){try{var t=localStorage.getItem(${JSON.stringify(THEME_STORAGE_KEY)});if(t==="light"||t==="dark")document.documentElement.setAttribute(${JSON.stringify(THEME_ATTRIBUTE)},t)}catch(e){}})();`;

/**
 * Place inside <head> in the root layout. The script changes <html> before React
 * hydrates, so give the <html> element suppressHydrationWarning, which silences
 * the attribute mismatch on that one element only:
 *
 *   <html lang="en" className={`${sans.variable} ${mono.variable}`} suppressHydrationWarning>
 *     <head><ThemeScript /></head>
 *
 * Pass the request's nonce when a Content-Security-Policy forbids inline scripts.
 */
export function ThemeScript({ nonce }: { nonce?: string }) {
  return <script nonce={nonce} dangerouslySetInnerHTML={{ __html: SCRIPT }} />;
}
