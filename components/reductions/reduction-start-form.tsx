"use client";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Checkbox } from "@/components/ui/checkbox";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { markedFieldsMessage } from "@/lib/http/action-result";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";
import type { RunChoice } from "@/lib/reductions/run-options";
import { DEFAULT_FILTER_STRENGTH, OUTPUT_LONG_SIDES_PX, REGISTRATION_MODES, reductionParamsSchema, type ReductionParamsInput, type RegistrationModeInput } from "@/lib/reductions/schemas";
import { fieldProblems } from "@/lib/validation";
import { FILTER_LABELS, OUTPUT_SIZE_LABEL, REGISTRATION_LABELS } from "./labels";

type FieldName = "registration" | "filter" | "filterStrength" | "outputLongSidePx" | "recoverResponse" | "groupNumber";

/** The form's values as the schema takes them (strings are coerced by it). */
function readForm(form: HTMLFormElement): Record<string, unknown> {
  const data = new FormData(form);
  const group = String(data.get("groupNumber") ?? "");
  return {
    registration: data.get("registration"),
    filter: data.get("filter"),
    filterStrength: data.get("filterStrength"),
    outputLongSidePx: data.get("outputLongSidePx"),
    recoverResponse: data.get("recoverResponse") === "on",
    groupNumber: group === "" ? null : group,
  };
}

/**
 * Starts a reduction of a bracket set: checked in the browser with the same zod
 * schema the server uses (problems under their labels), then posted; on success
 * the browser goes to the new reduction's page, where its progress shows.
 */
export function ReductionStartForm({
  setId,
  groups,
  initial = {},
  submitLabel = "Start reduction",
  choices,
  stayHere = false,
}: {
  setId: string;
  groups: number[];
  initial?: Partial<ReductionParamsInput>;
  submitLabel?: string;
  /** Which alignments the set's frames allow, and why not (lib/reductions/run-options); all are offered when absent. */
  choices?: Record<RegistrationModeInput, RunChoice>;
  /** Stay on this page (the review desk) and refresh it, instead of going to the new reduction's page. */
  stayHere?: boolean;
}) {
  const router = useRouter();
  const isOffered = (m: RegistrationModeInput) => choices?.[m].isOffered ?? true;
  const wanted = initial.registration ?? "sun";
  // A choice the frames do not allow is never preselected: the first one they allow is.
  // The corona first: it needs neither times nor orientation, and it is what the Sun's centre falls back to.
  const [registration, setRegistration] = useState<RegistrationModeInput>(isOffered(wanted) ? wanted : ((["corona", "moon", "sun"] as const).find(isOffered) ?? "corona"));
  // One line per distinct note: the corona and the Moon's limb often share theirs.
  const notes: { modes: RegistrationModeInput[]; note: string; isOffered: boolean }[] = [];
  for (const m of REGISTRATION_MODES) {
    const note = choices?.[m].note;
    if (!note) continue;
    const same = notes.find((n) => n.note === note && n.isOffered === isOffered(m));
    if (same) same.modes.push(m);
    else notes.push({ modes: [m], note, isOffered: isOffered(m) });
  }
  const short = (m: RegistrationModeInput) => REGISTRATION_LABELS[m].replace(/ \(.*\)$/, "");
  const start = useApiMutation(
    async (raw: Record<string, unknown>) => {
      // The server's own schema, in the browser first: problems show under their labels before anything is sent.
      const checked = reductionParamsSchema.safeParse(raw);
      if (!checked.success) {
        const found = fieldProblems(checked.error, raw);
        throw ApiProblem.local(markedFieldsMessage(found.length), Object.fromEntries(found.map((p) => [p.field.split(".")[0], p.message])));
      }
      return fetchJson<{ id: string }>(`/api/bracket-sets/${encodeURIComponent(setId)}/reductions`, { body: checked.data });
    },
    {
      // The review desk stays and reads its list again; elsewhere the browser goes to the new reduction's page.
      refresh: stayHere,
      onSuccess: (reduction) => {
        if (!stayHere) router.push(`/studio/reductions/${reduction.id}`);
      },
    },
  );
  const err = (field: FieldName) => start.error?.fields[field];

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    start.mutate(readForm(event.currentTarget));
  }

  return (
    <form onSubmit={handleSubmit} noValidate className="flex flex-col gap-5">
      <Feedback
        look="box"
        problem={start.error}
        summarizeFields
        success={start.isSuccess && stayHere ? "Re-reduction started. It is queued and shows in the list of reductions, with its progress." : null}
      />
      <div className="grid grid-cols-1 gap-5 sm:grid-cols-2">
        <Field
          label="Align frames on"
          error={err("registration")}
          hint={
            notes.length ? (
              <span className="flex flex-col gap-1">
                {notes.map((n) => (
                  <span key={n.modes.join()} className={n.modes.includes(registration) || !n.isOffered ? "text-warn" : undefined}>
                    {!n.isOffered ? `Not offered: ${n.note}` : `${n.modes.map(short).join(" and ")}: ${n.note}`}
                  </span>
                ))}
              </span>
            ) : (
              "The Sun's centre needs the site and the frames' capture times."
            )
          }
        >
          <Select
            name="registration"
            value={registration}
            onChange={(e) => setRegistration(e.target.value as RegistrationModeInput)}
            options={REGISTRATION_MODES.map((value) => ({ value, label: isOffered(value) ? REGISTRATION_LABELS[value] : `${REGISTRATION_LABELS[value]}: not offered, see below`, disabled: !isOffered(value) }))}
          />
        </Field>
        <Field label="Structure filter" error={err("filter")} hint="Used for the structure rendition; the natural rendition is not filtered.">
          <Select name="filter" defaultValue={initial.filter ?? "mgn"} options={Object.entries(FILTER_LABELS).map(([value, label]) => ({ value, label }))} />
        </Field>
        <Field label="Structure strength" error={err("filterStrength")} hint={`From 0.05 (gentle, more of the overall brightness) to 1 (local structure only); ${DEFAULT_FILTER_STRENGTH} is usual.`}>
          <Input name="filterStrength" type="number" inputMode="decimal" step="0.05" min="0.05" max="1" defaultValue={String(initial.filterStrength ?? DEFAULT_FILTER_STRENGTH)} />
        </Field>
        <Field label="Size of renditions and tiles" error={err("outputLongSidePx")} hint="The master FITS always keeps the full size.">
          <Select name="outputLongSidePx" defaultValue={String(initial.outputLongSidePx ?? 0)} options={OUTPUT_LONG_SIDES_PX.map((v) => ({ value: String(v), label: OUTPUT_SIZE_LABEL(v) }))} />
        </Field>
        {groups.length > 0 ? (
          <Field label="Frames" error={err("groupNumber")} hint="Reduce one bracket of the set, or every included light frame.">
            <Select name="groupNumber" defaultValue={initial.groupNumber ? String(initial.groupNumber) : ""} options={[{ value: "", label: "Every included light frame" }, ...groups.map((g) => ({ value: String(g), label: `Group ${g} only` }))]} />
          </Field>
        ) : null}
      </div>
      <div>
        <Checkbox name="recoverResponse" defaultChecked={initial.recoverResponse ?? false} label="Recover the camera's response from the bracket" hint="For 8-bit frames (JPEG) only: measures the camera's tone curve instead of assuming sRGB." />
        {err("recoverResponse") ? <p className="mt-1 text-sm font-medium text-danger">{err("recoverResponse")}</p> : null}
      </div>
      <div>
        <ScriptSubmitButton variant="primary" pending={start.isPending} pendingLabel="Starting…">
          {submitLabel}
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
