"use client";

import { useSyncExternalStore } from "react";
import { cx } from "@/components/ui/cx";
import { THEME_ATTRIBUTE, THEME_STORAGE_KEY, isTheme, type Theme } from "@/components/shell/theme-preference";

function readTheme(): Theme {
  const value = document.documentElement.getAttribute(THEME_ATTRIBUTE);
  return isTheme(value) ? value : "dark";
}

// Follows the attribute itself, so the toggle stays right whoever changes it.
function subscribe(onChange: () => void): () => void {
  const observer = new MutationObserver(onChange);
  observer.observe(document.documentElement, { attributes: true, attributeFilter: [THEME_ATTRIBUTE] });
  return () => observer.disconnect();
}

/**
 * A toggle button for the daylight theme (aria-pressed); its name stays the same
 * while its state changes, as the WAI-ARIA button pattern asks. The server has
 * no idea of the stored choice and renders the default until hydration.
 */
export function ThemeToggle({ className }: { className?: string }) {
  const theme = useSyncExternalStore(subscribe, readTheme, () => "dark" as Theme);
  const isLight = theme === "light";

  function toggle() {
    const next: Theme = isLight ? "dark" : "light";
    document.documentElement.setAttribute(THEME_ATTRIBUTE, next);
    try {
      localStorage.setItem(THEME_STORAGE_KEY, next);
    } catch {
      // Storage refused: the choice holds for this page only.
    }
  }

  return (
    <button
      type="button"
      aria-pressed={isLight}
      onClick={toggle}
      className={cx(
        "inline-flex min-h-11 items-center gap-2 rounded-control border border-line-strong px-3 text-sm text-ink hover:bg-surface-hover print:hidden",
        className,
      )}
    >
      <svg aria-hidden="true" viewBox="0 0 20 20" className="size-4">
        {isLight ? (
          <g fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round">
            <circle cx="10" cy="10" r="3.5" />
            <path d="M10 1.5v2.2M10 16.3v2.2M1.5 10h2.2M16.3 10h2.2M4 4l1.6 1.6M14.4 14.4 16 16M4 16l1.6-1.6M14.4 5.6 16 4" />
          </g>
        ) : (
          <path d="M15.5 12.6A6.5 6.5 0 0 1 7.4 4.5a6.5 6.5 0 1 0 8.1 8.1Z" fill="currentColor" />
        )}
      </svg>
      Daylight theme
    </button>
  );
}
