/** The badge tone of a bracket set's review state, shared by server and client components. */
export function stateTone(state: string): "ok" | "danger" | "warn" | "neutral" {
  return state === "approved" ? "ok" : state === "rejected" ? "danger" : state === "changes-requested" ? "warn" : "neutral";
}
