// The /proc readers and the line fit behind `npm run bench -- scale`. The status and
// stat layouts follow proc(5) (Linux man-pages: /proc/pid/status, /proc/pid/stat).
import { describe, expect, it } from "vitest";
import { findDescendants, fitLine, parseProcStat, parseProcStatus } from "@/scripts/bench/proc-stats";

// A node process's /proc/PID/status as Linux 6.x prints it (shortened after VmRSS's neighbours).
const STATUS = [
  "Name:\tnode",
  "Umask:\t0022",
  "State:\tS (sleeping)",
  "Tgid:\t41235",
  "Pid:\t41235",
  "PPid:\t41200",
  "VmPeak:\t 3512044 kB",
  "VmSize:\t 3498120 kB",
  "VmLck:\t       0 kB",
  "VmHWM:\t 1834512 kB",
  "VmRSS:\t  912384 kB",
  "RssAnon:\t  880000 kB",
  "VmData:\t 2100000 kB",
  "Threads:\t11",
  "",
].join("\n");

// A zombie keeps its status file but no memory lines.
const ZOMBIE_STATUS = "Name:\tperl\nState:\tZ (zombie)\nTgid:\t41300\nPid:\t41300\nPPid:\t41235\nThreads:\t1\n";

describe("parseProcStatus", () => {
  it("reads VmRSS and VmHWM in bytes, not VmPeak or RssAnon", () => {
    expect(parseProcStatus(STATUS)).toEqual({ rssBytes: 912384 * 1024, hwmBytes: 1834512 * 1024 });
  });

  it("gives null for a process that holds no memory", () => {
    expect(parseProcStatus(ZOMBIE_STATUS)).toBeNull();
  });
});

describe("parseProcStat", () => {
  it("counts the fields after the last parenthesis, so a name with spaces and parentheses does not shift them", () => {
    // Fields of proc(5): pid (comm) state ppid pgrp session tty_nr tpgid flags minflt cminflt majflt cmajflt utime stime cutime cstime ...
    const line = "41235 (node (scale) 2) R 41200 41200 7835 0 -1 4194304 523 0 0 0 1234 56 78 9 20 0 11 0 1471890 3133440 388";
    expect(parseProcStat(line)).toEqual({ pid: 41235, comm: "node (scale) 2", ppid: 41200, utimeTicks: 1234, stimeTicks: 56 });
  });

  it("gives null for text that is no stat line or stops before the CPU times", () => {
    expect(parseProcStat("")).toBeNull();
    expect(parseProcStat("41235 (node) R 41200 41200")).toBeNull();
    expect(parseProcStat("abc (node) R 1 2 3 4 5 6 7 8 9 10 11 12 13 14 15")).toBeNull();
    expect(parseProcStat("41235 (node) R 41200 41200 7835 0 -1 4194304 523 0 0 0 x 56")).toBeNull();
  });
});

describe("findDescendants", () => {
  it("finds children and grandchildren of every root, and nothing beside them", () => {
    // 100 -> 101 -> 103, 100 -> 102; 200 -> 201; 300 is unrelated, 1 is init.
    const parents = new Map([[100, 1], [101, 100], [102, 100], [103, 101], [200, 1], [201, 200], [300, 1]]);
    expect(findDescendants([100], parents)).toEqual([101, 102, 103]);
    expect(findDescendants([100, 200], parents).sort((a, b) => a - b)).toEqual([101, 102, 103, 201]);
    expect(findDescendants([999], parents)).toEqual([]);
  });

  it("does not list a root again when it is also below another root", () => {
    const parents = new Map([[101, 100], [102, 101]]);
    expect(findDescendants([100, 101], parents)).toEqual([102]);
  });
});

describe("fitLine", () => {
  it("returns a line the points lie on exactly", () => {
    const xs = [9, 27, 81];
    const line = fitLine(xs, xs.map((x) => 4.5 * x + 620));
    expect(line.slope).toBeCloseTo(4.5, 12);
    expect(line.intercept).toBeCloseTo(620, 10);
  });

  it("matches the normal equations worked by hand for scattered points", () => {
    // x = 9, 27, 81; y = 100, 190, 400: mean x 39, mean y 230, Sxx = 2808, Sxy = 11520,
    // slope = 11520 / 2808 = 160 / 39, intercept = 230 - 39 * 160 / 39 = 70.
    const line = fitLine([9, 27, 81], [100, 190, 400]);
    expect(line.slope).toBeCloseTo(160 / 39, 12);
    expect(line.intercept).toBeCloseTo(70, 10);
  });

  it("refuses fewer than two different x values and unequal lengths", () => {
    expect(() => fitLine([9, 9], [1, 2])).toThrow(/two different x/);
    expect(() => fitLine([9, 27], [1])).toThrow(/2 x values but 1 y values/);
  });
});
