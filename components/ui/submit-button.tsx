"use client";

import { useSyncExternalStore } from "react";
import { useFormStatus } from "react-dom";
import { Button, type ButtonProps } from "@/components/ui/button";

/**
 * A submit button for server-action forms: it turns pending by itself while its
 * form is being submitted, so people cannot send the same form twice.
 */
export function SubmitButton({ variant = "primary", pending, ...rest }: Omit<ButtonProps, "type">) {
  const status = useFormStatus();
  return <Button type="submit" variant={variant} pending={pending || status.pending} {...rest} />;
}

const noSubscription = () => () => undefined;

/** False in the server's HTML and until the page's script has taken over, then true. */
export function useHydrated(): boolean {
  return useSyncExternalStore(
    noSubscription,
    () => true,
    () => false,
  );
}

/**
 * The submit button of a form that the page's script sends (an onSubmit handler,
 * no server action). It stays disabled until the script has taken over: pressed
 * before then (or Enter in a field), the browser would send the form itself, as a
 * plain GET with every field, a password too, in the address.
 */
export function ScriptSubmitButton({ disabled, ...rest }: Omit<ButtonProps, "type">) {
  const hydrated = useHydrated();
  return (
    <>
      <Button type="submit" disabled={!hydrated || disabled} {...rest} />
      <noscript>
        <span className="text-sm text-ink-muted">This form is sent by the page&apos;s script: turn JavaScript on to send it.</span>
      </noscript>
    </>
  );
}
