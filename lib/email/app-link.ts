// Links into the app, for mail and for files that leave it (print bundles).
import { getEnv } from "@/lib/env";

/** A link into the app, from APP_URL (validated at start in the web app and the worker). */
export function appLink(path: string): string {
  return `${getEnv().APP_URL.replace(/\/+$/, "")}${path}`;
}
