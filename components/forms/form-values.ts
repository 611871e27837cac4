/** The named fields of a submitted form as strings ("" for a field that is absent), for a JSON body. */
export function formStrings<K extends string>(form: FormData, names: readonly K[]): Record<K, string> {
  return Object.fromEntries(names.map((name) => [name, String(form.get(name) ?? "")])) as Record<K, string>;
}
