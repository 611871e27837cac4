// The bracket-set services: what route handlers, server actions and the worker import.
export { createBracketSet, findBracketSet, listBracketSets, setClockOffset, toFrameDto } from "./bracket-sets";
export { abortFrameUpload, completeFrameUpload, listParts, signParts, startFrameUpload } from "./uploads";
export { correctFrame } from "./frames";
export * from "./schemas";
export type * from "./dto";
