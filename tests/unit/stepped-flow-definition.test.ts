// A stepped flow's definition is checked when it is made: its step names go into
// job ids (no ':' and nothing that changes on a whim), and a step that fans out
// must say what each part does.
import { describe, expect, it } from "vitest";
import { defineSteppedFlow, partIdPrefix, PART_FIELDS, type FlowJobContext, type FlowStep, type PartFields } from "@/lib/queue/stepped-flow";
import { z } from "zod";

type Parent = FlowJobContext<{ id: string }>;
type Part = FlowJobContext<{ id: string } & PartFields>;

function flowOf(steps: FlowStep<Parent, Part>[], partAttempts = 3) {
  return () => defineSteppedFlow<Parent, Part>({ partJob: "x.part", partQueue: "x", partAttempts, steps });
}

const part = async () => 1;
const parts = async () => [{ id: "a" }];

describe("defineSteppedFlow", () => {
  it("accepts steps with parts and plain steps", () => {
    expect(flowOf([{ name: "measure", parts, part }, { name: "plan", run: async () => null }])).not.toThrow();
  });

  it("refuses a step name that could not sit in a job id", () => {
    expect(flowOf([{ name: "a:b", run: async () => null }])).toThrow(/step name "a:b"/);
    expect(flowOf([{ name: "Measure", run: async () => null }])).toThrow(/lower-case/);
    expect(flowOf([{ name: "", run: async () => null }])).toThrow(/step name ""/);
  });

  it("refuses two steps of one name, since their parts' ids would meet", () => {
    expect(flowOf([{ name: "merge", run: async () => null }, { name: "merge", parts, part }])).toThrow(/appears twice/);
  });

  it("refuses a step with parts but no part work, or the reverse", () => {
    expect(flowOf([{ name: "merge", parts }])).toThrow(/needs both parts and part/);
    expect(flowOf([{ name: "merge", part }])).toThrow(/needs both parts and part/);
  });

  it("refuses fewer than one attempt per part", () => {
    expect(flowOf([{ name: "merge", parts, part }], 0)).toThrow(/partAttempts/);
  });
});

describe("part ids and payloads", () => {
  it("names the parent, its creation time and the step, so a parent queued anew under one id gets new parts", () => {
    expect(partIdPrefix({ id: "reduction.run__reductionId=1", timestamp: 1700000000000 }, "measure")).toBe("reduction.run__reductionId=1__1700000000000__measure__");
    expect(partIdPrefix({ id: "p", timestamp: 1 }, "measure")).not.toBe(partIdPrefix({ id: "p", timestamp: 2 }, "measure"));
  });

  it("checks the flow's fields of a part payload", () => {
    const schema = z.object({ reductionId: z.uuid(), ...PART_FIELDS });
    const ok = { reductionId: "6f1c1f1e-4a7e-4c55-9a55-1c1e1f1e4a7e", step: "measure", part: 0, parts: 12 };
    expect(schema.safeParse(ok).success).toBe(true);
    expect(schema.safeParse({ ...ok, part: -1 }).success).toBe(false);
    expect(schema.safeParse({ ...ok, part: 1.5 }).success).toBe(false);
    expect(schema.safeParse({ ...ok, parts: 0 }).success).toBe(false);
    expect(schema.safeParse({ ...ok, step: "a:b" }).success).toBe(false);
  });
});
