// Groups of frames within a set: split, merge and grouping by gaps, as pure
// functions over frames with capture times and names.
import { describe, expect, it } from "vitest";
import { compareFrames, findGroupForNewFrame, groupByGap, listGroups, mergeGroup, splitGroup, type GroupedFrame } from "@/lib/bracket-sets/grouping";

const T0 = Date.UTC(2027, 7, 2, 10, 4, 0);
const f = (id: string, offsetS: number | null, groupNumber = 1, fileName = `${id}.fits`): GroupedFrame => ({
  id,
  fileName,
  captureMs: offsetS === null ? null : T0 + offsetS * 1000,
  groupNumber,
});
const asObject = (m: Map<string, number>) => Object.fromEntries([...m].sort(([a], [b]) => (a < b ? -1 : 1)));

describe("compareFrames", () => {
  it("orders by capture time, then file name; frames without a time come last", () => {
    const frames = [f("c", null, 1, "a.fits"), f("b", 2, 1, "z.fits"), f("a", 2, 1, "y.fits"), f("d", 1), f("e", null, 1, "0.fits")];
    expect([...frames].sort(compareFrames).map((x) => x.id)).toEqual(["d", "a", "b", "e", "c"]);
  });
});

describe("splitGroup", () => {
  const frames = [f("a", 0, 1), f("b", 2, 1), f("c", 4, 1), f("d", 6, 1), f("e", 100, 2), f("f", 102, 2)];

  it("moves the frame and every later frame of its group to a new group, and later groups up by one", () => {
    expect(asObject(splitGroup(frames, "c"))).toEqual({ a: 1, b: 1, c: 2, d: 2, e: 3, f: 3 });
  });

  it("goes by capture order, not by the order the rows came in", () => {
    const shuffled = [frames[3], frames[0], frames[2], frames[1]];
    expect(asObject(splitGroup(shuffled, "b"))).toEqual({ a: 1, b: 2, c: 2, d: 2 });
  });

  it("refuses to split at the first frame of a group, naming the file", () => {
    expect(() => splitGroup(frames, "e")).toThrow(/e\.fits is already the first frame of group 2/);
  });

  it("refuses a frame that is not in the set", () => {
    expect(() => splitGroup(frames, "zz")).toThrow(/not found/);
  });
});

describe("mergeGroup", () => {
  const frames = [f("a", 0, 1), f("b", 2, 2), f("c", 4, 2), f("d", 60, 3)];

  it("joins group n to group n - 1 and moves later groups down by one", () => {
    expect(asObject(mergeGroup(frames, 2))).toEqual({ a: 1, b: 1, c: 1, d: 2 });
    expect(asObject(mergeGroup(frames, 3))).toEqual({ a: 1, b: 2, c: 2, d: 2 });
  });

  it("refuses a group that does not exist, naming the groups there are", () => {
    expect(() => mergeGroup(frames, 7)).toThrow(/There is no group 7; the set has groups 1, 2, 3/);
  });

  it("refuses the first group", () => {
    expect(() => mergeGroup(frames, 1)).toThrow(/first group/);
  });

  it("undoes a split", () => {
    const split = splitGroup(frames, "c");
    const after = frames.map((x) => ({ ...x, groupNumber: split.get(x.id)! }));
    expect(asObject(mergeGroup(after, split.get("c")!))).toEqual({ a: 1, b: 2, c: 2, d: 3 });
  });
});

describe("groupByGap", () => {
  it("starts a new group wherever consecutive frames are more than the gap apart", () => {
    // Two brackets 2 s apart within, 90 s between them, then one 20 s later (not more than 20 s: same group).
    const frames = [f("a", 0), f("b", 2), f("c", 4), f("d", 94), f("e", 96), f("g", 116)];
    expect(asObject(groupByGap(frames, 20))).toEqual({ a: 1, b: 1, c: 1, d: 2, e: 2, g: 2 });
    expect(asObject(groupByGap(frames, 19.9))).toEqual({ a: 1, b: 1, c: 1, d: 2, e: 2, g: 3 });
  });

  it("puts frames without a capture time in the last group", () => {
    const frames = [f("a", 0, 3), f("b", 300, 1), f("x", null, 2)];
    expect(asObject(groupByGap(frames, 20))).toEqual({ a: 1, b: 2, x: 2 });
  });

  it("refuses a gap that is not a positive number of seconds", () => {
    expect(() => groupByGap([f("a", 0)], 0)).toThrow(/positive number of seconds/);
    expect(() => groupByGap([f("a", 0)], Number.NaN)).toThrow(/positive number of seconds/);
  });

  it("numbers groups 1..k without gaps", () => {
    const frames = [f("a", 0), f("b", 1000), f("c", 2000)];
    const g = groupByGap(frames, 20);
    expect(listGroups(frames.map((x) => ({ ...x, groupNumber: g.get(x.id)! })))).toEqual([1, 2, 3]);
  });
});

describe("findGroupForNewFrame", () => {
  const others = [
    { captureMs: T0, groupNumber: 1 },
    { captureMs: T0 + 4000, groupNumber: 1 },
    { captureMs: T0 + 64_000, groupNumber: 2 },
    { captureMs: null, groupNumber: 3 },
  ];

  it("joins the group of the frame nearest in time", () => {
    expect(findGroupForNewFrame(others, T0 + 6000)).toBe(1);
    expect(findGroupForNewFrame(others, T0 + 50_000)).toBe(2);
    expect(findGroupForNewFrame(others, T0 + 600_000)).toBe(2);
  });

  it("takes the earlier frame on a tie", () => {
    expect(findGroupForNewFrame(others, T0 + 34_000)).toBe(1);
  });

  it("gives no group without a capture time, or with no timed frame to compare", () => {
    expect(findGroupForNewFrame(others, null)).toBeNull();
    expect(findGroupForNewFrame([{ captureMs: null, groupNumber: 2 }], T0)).toBeNull();
  });
});
