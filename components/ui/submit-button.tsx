"use client";

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
