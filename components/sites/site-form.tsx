"use client";
import { useActionState, useState, type ChangeEvent } from "react";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { SubmitButton } from "@/components/ui/submit-button";
import type { FormAction } from "@/lib/http/action-result";
import { MAX_TRACK_CHARS, MAX_TRACK_LABEL } from "@/lib/sites/limits";
import type { SiteDto } from "@/lib/sites/sites";


const PRECISION_OPTIONS = [
  { value: "exact", label: "Exact: public pages and files may show the position as entered" },
  { value: "rounded", label: "Rounded: public pages and files show it to about 10 km" },
  { value: "hidden", label: "Hidden: public pages and files show no position, label or country" },
];

/**
 * A fixed site takes coordinates; a moving one a GPX or CSV track, read in the
 * browser and sent as text (the server parses and checks every point). Given a
 * site, the form edits it; a moving site then keeps its track unless a new file
 * is chosen.
 */
export function SiteForm({ action, site }: { action: FormAction; site?: SiteDto }) {
  const [state, formAction] = useActionState(action, null);
  const [kind, setKind] = useState<"fixed" | "moving">(site?.kind ?? "fixed");
  const keepsTrack = site?.kind === "moving" && kind === "moving";
  const [track, setTrack] = useState<{ name: string; text: string } | null>(null);
  const [readError, setReadError] = useState("");
  const err = (f: string) => state?.fields?.find((x) => x.field === f)?.message;
  // After a refused submission, show what was typed (React resets the form).
  const v = (name: string, fallback = "") => state?.values?.[name] ?? fallback;
  const initial = (name: keyof SiteDto) => (site && site[name] !== null ? String(site[name]) : "");

  async function onFile(e: ChangeEvent<HTMLInputElement>) {
    const file = e.target.files?.[0];
    setReadError("");
    setTrack(null);
    if (!file) return;
    if (file.size > MAX_TRACK_CHARS) {
      setReadError(`${file.name} is larger than ${MAX_TRACK_LABEL}, the most a track file may have.`);
      return;
    }
    setTrack({ name: file.name, text: await file.text() });
  }

  return (
    <form key={state ? JSON.stringify(state.values ?? {}) : "initial"} action={formAction} className="flex flex-col gap-5">
      <Feedback look="box" result={state} />
      {site ? <input type="hidden" name="id" value={site.id} /> : null}
      <Field label="Site name" hint="Yours only: for example “Luxor, the hotel roof” or “MV Sfax Star, deck 6”. Public pages never show it." error={err("name")} required>
        <Input name="name" defaultValue={v("name", initial("name"))} required maxLength={80} />
      </Field>
      <Field
        label="Public label"
        hint="What public pages call the place when the location is exact or rounded, such as a town or a sea: “Luxor”, “Gulf of Gabes”. Leave it empty to show the country only."
        error={err("publicLabel")}
      >
        <Input name="publicLabel" defaultValue={v("publicLabel", initial("publicLabel"))} maxLength={80} />
      </Field>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-medium">Kind of site</legend>
        <label className="flex items-center gap-3">
          <input type="radio" name="kind" value="fixed" checked={kind === "fixed"} onChange={() => setKind("fixed")} />
          Fixed: a place on land
        </label>
        <label className="flex items-center gap-3">
          <input type="radio" name="kind" value="moving" checked={kind === "moving"} onChange={() => setKind("moving")} />
          Moving: a ship or an aircraft, with a time-stamped track
        </label>
      </fieldset>
      {kind === "fixed" ? (
        <div className="grid gap-5 sm:grid-cols-3">
          <Field label="Latitude (°)" hint="North positive, e.g. 25.69." error={err("latDeg")} required>
            <Input name="latDeg" type="number" step="any" min={-90} max={90} inputMode="decimal" defaultValue={v("latDeg", site?.kind === "fixed" ? initial("latDeg") : "")} required />
          </Field>
          <Field label="Longitude (°)" hint="East positive, e.g. 32.64." error={err("lonDeg")} required>
            <Input name="lonDeg" type="number" step="any" min={-180} max={180} inputMode="decimal" defaultValue={v("lonDeg", site?.kind === "fixed" ? initial("lonDeg") : "")} required />
          </Field>
          <Field label="Elevation (m)" hint="Above sea level." error={err("elevationM")}>
            <Input name="elevationM" type="number" step="any" defaultValue={v("elevationM", site?.kind === "fixed" ? initial("elevationM") : "0")} inputMode="decimal" />
          </Field>
        </div>
      ) : (
        <Field
          label="Track file (GPX or CSV)"
          hint={`CSV: a header row with time (ISO 8601, UTC), lat, lon and optionally elevation_m.${keepsTrack ? ` Leave it empty to keep ${site?.trackFileName ?? "the present track"}.` : ""}`}
          error={readError || err("trackText") || err("trackFileName")}
          required={!keepsTrack}
        >
          <Input type="file" accept=".gpx,.csv,application/gpx+xml,text/csv" onChange={onFile} required={!keepsTrack} />
        </Field>
      )}
      {kind === "moving" && track ? (
        <>
          <input type="hidden" name="trackFileName" value={track.name} />
          <input type="hidden" name="trackText" value={track.text} />
        </>
      ) : null}
      <Field label="Location on public pages" error={err("precision")}>
        <Select name="precision" defaultValue={v("precision", site?.precision ?? "rounded")} options={PRECISION_OPTIONS} />
      </Field>
      <div>
        <SubmitButton>{site ? "Save changes" : "Save site"}</SubmitButton>
      </div>
    </form>
  );
}
