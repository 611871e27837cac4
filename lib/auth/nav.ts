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
  { href: "/studio", label: "Studio", action: "studio:use" },
  { href: "/review", label: "Review desk", action: "review:use" },
  { href: "/editions", label: "Editions", action: "editions:use" },
  { href: "/admin/people", label: "People", action: "people:list" },
  { href: "/admin/settings", label: "Settings", action: "settings:edit" },
];

export function navFor(roles: readonly Role[]): NavEntry[] {
  return NAV_ENTRIES.filter((e) => !e.action || can(roles, e.action));
}
