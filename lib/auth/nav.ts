// Navigation entries a person's roles allow. Showing a link is a convenience;
// every page and handler behind it checks the permission again on the server.
import { can, type Action } from "./permissions";
import type { Role } from "./roles";

export interface NavEntry {
  href: string;
  label: string;
  action?: Action;
}

export const NAV_ENTRIES: NavEntry[] = [
  { href: "/", label: "Home" },
  { href: "/gallery", label: "Gallery" },
  { href: "/eclipses", label: "Eclipses" },
  { href: "/planner", label: "Planner" },
  { href: "/studio", label: "Studio", action: "studio:use" },
  { href: "/review", label: "Review desk", action: "review:use" },
  { href: "/editions", label: "Editions", action: "editions:use" },
  // People, the eclipse catalogue and the society's settings are reached from /admin.
  { href: "/admin", label: "Admin", action: "people:list" },
];

export function navFor(roles: readonly Role[]): NavEntry[] {
  return NAV_ENTRIES.filter((e) => !e.action || can(roles, e.action));
}
