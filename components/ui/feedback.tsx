import type { ReactNode } from "react";
import type { ActionResult } from "@/lib/http/action-result";
import { markedFieldsMessage } from "@/lib/http/action-result";
import { ApiProblem, describeProblem } from "@/lib/http/client-fetch";
import { cx } from "@/components/ui/cx";

/**
 * How the message sits on the page: `box`, a tinted panel above or below a form;
 * `line`, one line of text beside a control; `tinted`, one line in the tone's
 * colour (the bracket set's tools).
 */
export type FeedbackLook = "box" | "line" | "tinted";

const LOOKS: Record<FeedbackLook, { problem: string; success: string }> = {
  box: {
    problem: "rounded-control border border-danger/50 bg-danger/10 px-3 py-2 text-danger",
    success: "rounded-control border border-ok/50 bg-ok/10 px-3 py-2 text-ok",
  },
  line: { problem: "text-sm font-medium text-danger", success: "text-sm" },
  tinted: { problem: "text-sm font-medium text-danger", success: "text-sm font-medium text-ok" },
};

export interface FeedbackProps {
  /** What went wrong: a refused or failed call, or words of our own. */
  problem?: ApiProblem | ReactNode;
  /** What was done. */
  success?: ReactNode;
  /** A server action's answer: its message as a problem or a success. */
  result?: ActionResult | null;
  look?: FeedbackLook;
  /** The page's labels by field key: a refusal that names these fields names them by their labels. */
  labels?: Readonly<Record<string, string>>;
  /** The form shows each field's problem under its label: the summary only says how many there are. */
  summarizeFields?: boolean;
  /**
   * Keep a polite live region on the page from the first render, empty until
   * there is news: screen readers only announce changes to a region they
   * already know about.
   */
  live?: boolean;
  className?: string;
}

function problemText(problem: FeedbackProps["problem"], labels: FeedbackProps["labels"], summarizeFields: boolean): ReactNode {
  if (!(problem instanceof ApiProblem)) return problem;
  if (summarizeFields && problem.hasFields) return markedFieldsMessage(problem.fieldList.length);
  return describeProblem(problem, labels);
}

/**
 * The one way a page says how an action went: a problem is an alert (announced
 * at once), a success a status (announced politely). Shows nothing when there
 * is nothing to say, unless it is `live`.
 */
export function Feedback({ problem, success, result, look = "line", labels, summarizeFields = false, live = false, className }: FeedbackProps) {
  const problemNode = result && !result.ok ? result.message : problemText(problem, labels, summarizeFields);
  const successNode = result?.ok ? result.message : success;
  const hasProblem = problemNode !== null && problemNode !== undefined && problemNode !== false && problemNode !== "";
  const hasSuccess = !hasProblem && successNode !== null && successNode !== undefined && successNode !== false && successNode !== "";
  const alert = hasProblem ? (
    <p role="alert" className={cx(LOOKS[look].problem, !live && className)}>
      {problemNode}
    </p>
  ) : null;
  if (live) {
    return (
      <div className={className}>
        <p role="status" aria-live="polite" className={hasSuccess ? LOOKS[look].success : undefined}>
          {hasSuccess ? successNode : null}
        </p>
        {alert}
      </div>
    );
  }
  if (alert) return alert;
  return hasSuccess ? (
    <p role="status" className={cx(LOOKS[look].success, className)}>
      {successNode}
    </p>
  ) : null;
}
