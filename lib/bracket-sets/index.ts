// The bracket-set services: what route handlers, server actions and the worker import.
export { createBracketSet, findBracketSet, listBracketSets, setClockOffset, toFrameDto, updateBracketSet } from "./bracket-sets";
export { abortFrameUpload, completeFrameUpload, listParts, signParts, startFrameUpload } from "./uploads";
export { correctFrame, removeRefusedFrame } from "./frames";
export { frameTimesSchema, giveFrameTimes, type FrameTimesInput } from "./given-times";
export { removeFrame } from "./remove-frame";
export { changeGroups } from "./groups";
export { attachmentDisposition, openFrameOriginal, openFrameThumbnail, type FrameFile } from "./frame-files";
export { submitBracketSet } from "./submit";
export * from "./schemas";
export type * from "./dto";
