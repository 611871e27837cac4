// The composite runner's public surface: what the CLI (and later the worker) imports.
export { runCompositeOnFiles, COMPOSITE_REPORT_VERSION, type CompositeReport, type RunCompositeOptions } from "./run-composite";
export { CompositeInputError, isCompositeInputError, type CompositeInputCode } from "./errors";
export { parseComposeArgs, COMPOSE_USAGE, type ComposeArgs } from "./cli-args";
export { readCompositeMaster, requireOneEclipse, type ReadMaster, type MasterProvenance } from "./read-master";
export { runCompositeInThread } from "./run-in-thread";
