// All-or-nothing output: a reduction is written into a staging folder beside
// the target and renamed into place at the end, so a failed or interrupted run
// leaves no half-written reduction, and an existing reduction is never
// overwritten (a bracket set has many reductions; none replaces another).
import { rmSync } from "node:fs";
import { mkdir, readdir, rename, rm, stat } from "node:fs/promises";
import { basename, dirname, join, resolve } from "node:path";
import { ReductionInputError } from "./errors";

/** Staging folders of runs in progress, so a process that is told to stop can remove them. */
const activeStagingDirs = new Set<string>();

export interface StagedOutput {
  /** Where the finished reduction will be. */
  finalDir: string;
  /** Where it is written meanwhile. */
  stagingDir: string;
}

async function isNonEmptyDir(path: string): Promise<boolean> {
  const info = await stat(path).catch(() => null);
  if (!info) return false;
  if (!info.isDirectory()) throw new ReductionInputError("bad-option", `--out ${path}: a file of that name exists; give a folder name`);
  return (await readdir(path)).length > 0;
}

/** Checks the target and creates the staging folder. */
export async function createStagedOutput(outDir: string): Promise<StagedOutput> {
  const finalDir = resolve(outDir);
  if (await isNonEmptyDir(finalDir)) {
    throw new ReductionInputError("bad-option", `--out ${outDir}: the folder exists and is not empty; a reduction never overwrites another, choose a new folder`);
  }
  const stagingDir = join(dirname(finalDir), `.${basename(finalDir)}.partial-${process.pid}`);
  await rm(stagingDir, { recursive: true, force: true });
  await mkdir(stagingDir, { recursive: true });
  activeStagingDirs.add(stagingDir);
  return { finalDir, stagingDir };
}

/** Moves the finished reduction into place (rename replaces an empty target folder atomically). */
export async function commitStagedOutput(output: StagedOutput): Promise<void> {
  if (await isNonEmptyDir(output.finalDir)) {
    throw new ReductionInputError("bad-option", `${output.finalDir}: the folder was filled by someone else during the run; the reduction is left in ${output.stagingDir}`);
  }
  await rm(output.finalDir, { recursive: true, force: true });
  await rename(output.stagingDir, output.finalDir);
  activeStagingDirs.delete(output.stagingDir);
}

export async function discardStagedOutput(output: StagedOutput): Promise<void> {
  await rm(output.stagingDir, { recursive: true, force: true });
  activeStagingDirs.delete(output.stagingDir);
}

/** For a signal handler: removes every unfinished staging folder at once. */
export function discardActiveStagingSync(): void {
  for (const dir of activeStagingDirs) rmSync(dir, { recursive: true, force: true });
  activeStagingDirs.clear();
}
