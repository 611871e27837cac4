import { cloneElement, useId, type ReactElement, type ReactNode } from "react";
import { cx } from "@/components/ui/cx";

/** The accessibility props Field hands to its control. */
type ControlProps = {
  id?: string;
  required?: boolean;
  "aria-describedby"?: string;
  "aria-invalid"?: boolean | "true" | "false";
};

export type FieldProps = {
  label: ReactNode;
  /** One control: Input, Select, Textarea or a native element. Its name passes through. */
  children: ReactElement<ControlProps>;
  hint?: ReactNode;
  /** Message shown when the value was refused; marks the control aria-invalid. */
  error?: ReactNode;
  required?: boolean;
  /** The control's id; generated when neither this nor the control's own id is given. */
  id?: string;
  className?: string;
};

/**
 * A label, a control, a hint and an error message, wired together: the label's
 * htmlFor points at the control, aria-describedby lists the hint and the error,
 * aria-invalid follows the error. Works in server-action forms as is, because
 * the control keeps its own name and value.
 */
export function Field({ label, children, hint, error, required, id, className }: FieldProps) {
  const generatedId = useId();
  const controlId = id ?? children.props.id ?? `field-${generatedId}`;
  const hintId = hint ? `${controlId}-hint` : undefined;
  const errorId = error ? `${controlId}-error` : undefined;
  const describedBy =
    [children.props["aria-describedby"], hintId, errorId].filter(Boolean).join(" ") || undefined;

  const control = cloneElement(children, {
    id: controlId,
    required: required ?? children.props.required,
    "aria-describedby": describedBy,
    "aria-invalid": error ? true : children.props["aria-invalid"],
  });

  return (
    <div className={cx("flex flex-col gap-1.5", className)}>
      <label htmlFor={controlId} className="text-sm font-medium text-ink">
        {label}
        {/* The control's required attribute is what assistive technology announces. */}
        {required ? (
          <span aria-hidden="true" className="text-ink-muted">
            {" *"}
          </span>
        ) : null}
      </label>
      {hint ? (
        <p id={hintId} className="text-sm text-ink-muted">
          {hint}
        </p>
      ) : null}
      {control}
      {error ? (
        <p id={errorId} className="flex items-start gap-1.5 text-sm font-medium text-danger">
          <span aria-hidden="true">✕</span>
          <span>{error}</span>
        </p>
      ) : null}
    </div>
  );
}
