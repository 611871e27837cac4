// The reduction runner's public surface: what the CLI and the worker import.
export { runReductionOnFiles, type RunReductionOptions, type RunReductionResult, type RunProgressFn } from "./run-reduction";
export { ReductionInputError, isBadInputError, type ReductionInputCode } from "./errors";
export { parseExposuresCsv, readExposuresCsv } from "./exposures-csv";
export { parseReduceArgs, REDUCE_USAGE, type ReduceArgs } from "./cli-args";
export type { ReductionReport } from "./report";
export { discardActiveStagingSync } from "./output-dir";
export { parseSiteText, parseSiteTrackText, readSiteTrackFile, type SiteSpec } from "./sky-site";
export type { RunnerRegistrationMode, SkyOptions } from "./sky-run";
