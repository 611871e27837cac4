"use client";
import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Input } from "@/components/ui/input";
import type { FormAction } from "@/components/forms/action-result";


/** One eclipse's name and featured flag, saved on its own. */
export function EclipseEditRow({
  action,
  id,
  kind,
  name,
  featured,
}: {
  action: FormAction;
  id: string;
  kind: string;
  name: string | null;
  featured: boolean;
}) {
  const [state, formAction, pending] = useActionState(action, null);
  return (
    <form action={formAction} className="flex flex-wrap items-center gap-3 border-b border-line py-2">
      <input type="hidden" name="id" value={id} />
      <span className="w-44 font-mono">
        {id} <span className="text-ink-muted">{kind}</span>
      </span>
      <label className="sr-only" htmlFor={`name-${id}`}>
        Name of the eclipse of {id}
      </label>
      <Input id={`name-${id}`} name="name" defaultValue={name ?? ""} maxLength={120} className="min-w-64 flex-1" placeholder="No name" />
      <label className="flex items-center gap-2">
        <input type="checkbox" name="featured" defaultChecked={featured} /> Featured
      </label>
      <Button type="submit" size="sm" pending={pending}>
        Save<span className="sr-only"> {id}</span>
      </Button>
      <span role="status" className={state?.ok === false ? "text-danger" : "text-ok"}>
        {state?.fields?.length ? state.fields.map((f) => f.message).join("; ") : (state?.message ?? "")}
      </span>
    </form>
  );
}
