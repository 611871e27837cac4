/**
 * Joins class names, skipping falsy parts, so a component can add conditional
 * classes without a dependency. No conflict resolution: callers add, never fight.
 */
export function cx(...parts: Array<string | false | null | undefined>): string {
  return parts.filter(Boolean).join(" ");
}
