import localFont from "next/font/local";

// Fonts ship with the app from @fontsource packages: the build machine has no
// internet, so next/font/google would fail. Latin subset, variable weight axis.
// Put `${sans.variable} ${mono.variable}` on <html>: next/font's class sets
// --font-sans and --font-mono there, and because that rule is unlayered it wins
// over the fallback stacks that globals.css declares in Tailwind's theme layer,
// so the font-sans and font-mono utilities pick these faces up.
export const sans = localFont({
  src: "../node_modules/@fontsource-variable/inter/files/inter-latin-wght-normal.woff2",
  weight: "100 900",
  style: "normal",
  display: "swap",
  variable: "--font-sans",
  fallback: ["system-ui", "Segoe UI", "Roboto", "Helvetica Neue", "Arial", "sans-serif"],
});

export const mono = localFont({
  src: "../node_modules/@fontsource-variable/jetbrains-mono/files/jetbrains-mono-latin-wght-normal.woff2",
  weight: "100 800",
  style: "normal",
  display: "swap",
  variable: "--font-mono",
  fallback: ["ui-monospace", "SFMono-Regular", "Menlo", "Consolas", "monospace"],
  // Monospace appears in tables and logs further down the page, rarely above the fold.
  preload: false,
});
