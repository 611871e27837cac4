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
import type { ComposableReduction } from "@/lib/composites/composites";
import { FILTER_LABELS } from "@/components/reductions/labels";
import { markedFieldsMessage } from "@/lib/http/action-result";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";

const MAX_INPUTS = 6;

/**
 * Chooses two or more finished reductions of one eclipse, each shown with its
 * plate scale and its field in solar radii, and starts their composite. The
 * server checks everything again; its refusals show under the form.
 */
/** The form's values as the server takes them, or the problems found before sending. */
function readChoice(data: FormData, chosen: string[]) {
  const scaleText = String(data.get("scale") ?? "").trim();
  const problems: Record<string, string> = {};
  if (chosen.length < 2) problems.reductionIds = "Choose at least two reductions.";
  const scale = scaleText === "" ? undefined : Number(scaleText);
  if (scale !== undefined && !(scale > 0)) problems.scaleArcsecPerPx = "A plate scale is a positive number of arcseconds per pixel.";
  const title = String(data.get("title") ?? "").trim();
  if (!title) problems.title = "Give the composite a title.";
  if (Object.keys(problems).length) throw ApiProblem.local(markedFieldsMessage(Object.keys(problems).length), problems);
  return { title, reductionIds: chosen, refine: data.get("refine") === "on", filter: data.get("filter"), ...(scale ? { scaleArcsecPerPx: scale } : {}) };
}

export function CompositeStartForm({ choices, canComposeOthers }: { choices: ComposableReduction[]; canComposeOthers: boolean }) {
  const router = useRouter();
  const [chosen, setChosen] = useState<string[]>([]);
  const compose = useApiMutation(async (data: FormData) => fetchJson<{ id: string }>("/api/composites", { body: readChoice(data, chosen) }), {
    refresh: false,
    onSuccess: (created) => router.push(`/studio/composites/${created.id}`),
  });
  const fields = compose.error?.fields ?? {};
  const eclipses = [...new Set(choices.map((c) => c.eclipseId))];
  const chosenEclipse = choices.find((c) => c.reductionId === chosen[0])?.eclipseId ?? null;

  const toggle = (id: string, on: boolean) => setChosen((list) => (on ? [...list, id] : list.filter((x) => x !== id)));

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    compose.mutate(new FormData(event.currentTarget));
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-6">
      <fieldset className="flex flex-col gap-4" aria-describedby={fields.reductionIds ? "composite-inputs-error" : undefined}>
        <legend className="mb-2 text-lg font-semibold">Reductions to compose</legend>
        <p className="text-sm text-ink-muted">
          Finished reductions registered on the Sun (with the site and capture times) appear here.{" "}
          {canComposeOthers ? "As a curator you may combine several observers' reductions." : "You may combine your own; a curator can combine several observers'."}{" "}
          The finest plate scale sets the composite&apos;s; choose up to {MAX_INPUTS}.
        </p>
        {eclipses.map((eclipse) => (
          <div key={eclipse} className="flex flex-col gap-2">
            <h3 className="font-semibold">Eclipse of {eclipse}</h3>
            <ul className="flex flex-col gap-2">
              {choices.filter((c) => c.eclipseId === eclipse).map((c) => {
                const isChosen = chosen.includes(c.reductionId);
                const otherEclipse = chosenEclipse !== null && chosenEclipse !== c.eclipseId;
                return (
                  <li key={c.reductionId}>
                    <Checkbox
                      name="reductionIds"
                      value={c.reductionId}
                      checked={isChosen}
                      disabled={!isChosen && (otherEclipse || chosen.length >= MAX_INPUTS)}
                      onChange={(e) => toggle(c.reductionId, e.currentTarget.checked)}
                      label={`${c.setName}${canComposeOthers ? `, by ${c.photographer}` : ""}`}
                      hint={`${c.plateScaleArcsecPerPx.toFixed(2)} arcsec per pixel; field ${c.fieldR.inner.toFixed(1)} solar radii to its nearest edge, ${c.fieldR.outer.toFixed(1)} to its corners${c.finishedAt ? `; reduced ${c.finishedAt.slice(0, 10)}` : ""}`}
                    />
                  </li>
                );
              })}
            </ul>
          </div>
        ))}
        {fields.reductionIds ? (
          <p id="composite-inputs-error" className="text-sm text-danger">
            {fields.reductionIds}
          </p>
        ) : null}
      </fieldset>
      <Field label="Title" error={fields.title} required hint="Shown on the composite's page, e.g. “Luxor, both lenses”.">
        <Input name="title" maxLength={120} />
      </Field>
      <Field label="Plate scale (arcsec per pixel)" error={fields.scaleArcsecPerPx} hint="Leave empty for the finest input's. A coarser scale makes a smaller composite.">
        <Input name="scale" inputMode="decimal" />
      </Field>
      <Field label="Structure filter">
        <Select name="filter" defaultValue="mgn">
          {Object.entries(FILTER_LABELS).map(([value, label]) => (
            <option key={value} value={value}>
              {label}
            </option>
          ))}
        </Select>
      </Field>
      <Checkbox name="refine" defaultChecked label="Refine each input's position by correlating its corona with the finest input's" hint="The correction found is reported: it measures the input's sky coordinates' error." />
      <Feedback look="box" problem={compose.error} />
      <div>
        <ScriptSubmitButton variant="primary" disabled={compose.isPending}>
          {compose.isPending ? "Starting…" : "Compose"}
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
