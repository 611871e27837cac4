// The renditions a plate shows, as checkboxes named "renditions".
const LABELS = { natural: "Natural (tone-mapped light)", structure: "Structure (radially filtered)" } as const;

export function RenditionsPicker({ legend, error }: { legend: string; error?: string }) {
  return (
    <fieldset className="flex flex-col gap-1" aria-describedby={error ? "renditions-error" : undefined}>
      <legend className="text-sm font-medium">{legend}</legend>
      {(Object.keys(LABELS) as (keyof typeof LABELS)[]).map((key) => (
        <label key={key} className="flex items-center gap-2 text-sm">
          <input type="checkbox" name="renditions" value={key} defaultChecked />
          {LABELS[key]}
        </label>
      ))}
      {error ? (
        <p id="renditions-error" className="text-sm font-medium text-danger">
          {error}
        </p>
      ) : null}
    </fieldset>
  );
}
