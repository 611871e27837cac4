"use client";
// What the public reads of a plate: title, caption (40 words, counted as the
// curator types with the same countWords the server applies), description, alt
// text, the two credits, the licence and the link name.
import { useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { Textarea } from "@/components/ui/textarea";
import type { PlateLicence } from "@/db/schema/plates";
import { fetchJson } from "@/lib/http/client-fetch";
import { CAPTION_MAX_WORDS, countWords, type PlateTexts } from "@/lib/plates/desk-input";
import { LICENCE_INFO, licenceWarning } from "@/lib/plates/licences";

export interface PlateTextValues extends PlateTexts {
  slug: string;
}

export interface PlateTextFormProps {
  plateId: string;
  values: PlateTextValues;
  suggestions: { acquiredBy: string; processedBy: string; licence: PlateLicence };
  /** The link name is fixed once the plate has been public. */
  slugLocked: boolean;
  /** A plate withdrawn for good keeps its record as it was. */
  readOnly: boolean;
}

const LICENCE_OPTIONS = Object.values(LICENCE_INFO).map((l) => ({ value: l.id, label: l.name }));

/** The fields as the form names them, for the confirmation. */
const FIELD_NAMES: Record<string, string> = {
  title: "title",
  caption: "caption",
  description: "description",
  altText: "alt text",
  acquiredBy: "data acquisition",
  processedBy: "processing",
  licence: "licence",
  slug: "link name",
};

export function PlateTextForm({ plateId, values, suggestions, slugLocked, readOnly }: PlateTextFormProps) {
  const [v, setV] = useState<PlateTextValues>(values);
  const save = useApiMutation((texts: PlateTextValues) => fetchJson<{ changed: string[] }>(`/api/review/plates/${plateId}`, { method: "PATCH", body: texts }));
  const problem = save.error;
  const saved = save.data ? (save.data.changed.length ? `Saved: ${save.data.changed.map((f) => FIELD_NAMES[f] ?? f).join(", ")}.` : "Nothing had changed.") : null;
  const words = countWords(v.caption);
  const over = words > CAPTION_MAX_WORDS;
  const set = (k: keyof PlateTextValues) => (e: { target: { value: string } }) => setV((old) => ({ ...old, [k]: e.target.value }));

  function submit(e: FormEvent) {
    e.preventDefault();
    save.mutate(v);
  }

  const isCc = v.licence !== "all-rights-reserved";
  return (
    <form onSubmit={submit} noValidate className="flex max-w-3xl flex-col gap-5">
      <fieldset disabled={readOnly} className="flex flex-col gap-5">
        <Field label="Title" required error={problem?.fields.title}>
          <Input name="title" value={v.title} onChange={set("title")} maxLength={160} />
        </Field>
        <Field
          label="Caption"
          required
          hint={`The short text under the plate, at most ${CAPTION_MAX_WORDS} words.`}
          error={problem?.fields.caption}
        >
          <Textarea name="caption" rows={3} value={v.caption} onChange={set("caption")} aria-invalid={over || undefined} />
        </Field>
        {/* Polite: announced when the curator pauses, not on every key. */}
        <p aria-live="polite" className={over ? "-mt-3 text-sm font-medium text-danger" : "-mt-3 text-sm text-ink-muted"}>
          {words} of {CAPTION_MAX_WORDS} words{over ? `: ${words - CAPTION_MAX_WORDS} too many` : ""}
        </p>
        <Field label="Description" hint="The long text: what the plate shows and how it was made." error={problem?.fields.description}>
          <Textarea name="description" rows={8} value={v.description} onChange={set("description")} />
        </Field>
        <Field label="Alt text" required hint="For people who cannot see the image: what it shows, in a sentence or two." error={problem?.fields.altText}>
          <Textarea name="altText" rows={3} value={v.altText} onChange={set("altText")} />
        </Field>
        <fieldset className="flex flex-col gap-4 rounded-card border border-line p-4">
          <legend className="px-1 text-sm font-semibold">Credits</legend>
          <Field label="Data acquisition" required hint={`The person who took the frames. Suggested: ${suggestions.acquiredBy}.`} error={problem?.fields.acquiredBy}>
            <Input name="acquiredBy" value={v.acquiredBy} onChange={set("acquiredBy")} />
          </Field>
          <Field label="Processing" required hint={`A person, or the pipeline and its version. Suggested: ${suggestions.processedBy}.`} error={problem?.fields.processedBy}>
            <Input name="processedBy" value={v.processedBy} onChange={set("processedBy")} />
          </Field>
          <div>
            <Button size="sm" variant="quiet" onClick={() => setV((old) => ({ ...old, acquiredBy: suggestions.acquiredBy, processedBy: suggestions.processedBy }))}>
              Use the suggested credits
            </Button>
          </div>
        </fieldset>
        <Field
          label="Licence"
          required
          hint={suggestions.licence === v.licence ? "The society's default licence." : `The society's default is ${LICENCE_INFO[suggestions.licence].shortName}.`}
          error={problem?.fields.licence}
        >
          <Select name="licence" options={LICENCE_OPTIONS} value={v.licence} onChange={set("licence")} />
        </Field>
        {isCc ? <p className="-mt-3 rounded-control border border-warn/50 bg-warn/10 p-3 text-sm">{licenceWarning(v.licence)}</p> : null}
        <Field
          label="Link name"
          required
          hint={slugLocked ? "Fixed: the plate has been public, and its links are permanent." : `The plate's address: /plates/${v.slug || "…"}`}
          error={problem?.fields.slug}
        >
          <Input name="slug" value={v.slug} onChange={set("slug")} readOnly={slugLocked} />
        </Field>
      </fieldset>
      <Feedback problem={problem} success={saved} />
      {readOnly ? null : (
        <div>
          <ScriptSubmitButton variant="primary" pending={save.isPending} pendingLabel="Saving…">
            Save the texts
          </ScriptSubmitButton>
        </div>
      )}
    </form>
  );
}
