// The one rule for which attempt a run is (lib/queue/job-context.ts), from
// BullMQ's count of attempts that ended in failure.
import { UnrecoverableError } from "bullmq";
import { describe, expect, it } from "vitest";
import { attemptOf, isFailedForGood } from "@/lib/queue/job-context";

const job = (attemptsMade: number, attempts?: number) => ({ attemptsMade, opts: attempts === undefined ? {} : { attempts } });

describe("attemptOf", () => {
  it("numbers a running job's attempts from 1 and marks the last one allowed", () => {
    expect([0, 1, 2].map((made) => attemptOf(job(made, 3)))).toEqual([
      { attempt: 1, isFinalAttempt: false },
      { attempt: 2, isFinalAttempt: false },
      { attempt: 3, isFinalAttempt: true },
    ]);
  });

  it("counts a job that has just failed as on the attempt that failed", () => {
    expect(attemptOf(job(1, 3), "failed")).toEqual({ attempt: 1, isFinalAttempt: false });
    expect(attemptOf(job(3, 3), "failed")).toEqual({ attempt: 3, isFinalAttempt: true });
  });

  it("takes a job without an attempts option as allowed one attempt", () => {
    expect(attemptOf(job(0))).toEqual({ attempt: 1, isFinalAttempt: true });
  });
});

describe("isFailedForGood", () => {
  it("is true for bad input on any attempt, and for any fault on the last", () => {
    expect(isFailedForGood(job(1, 3), new UnrecoverableError("bad payload"))).toBe(true);
    expect(isFailedForGood(job(1, 3), new Error("connection reset"))).toBe(false);
    expect(isFailedForGood(job(3, 3), new Error("connection reset"))).toBe(true);
  });
});
