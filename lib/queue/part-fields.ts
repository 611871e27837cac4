// The fields a stepped flow's part job carries beside its ids (lib/queue/stepped-flow.ts),
// on their own so that the job registry (jobs.ts) takes them without the flow.
import { z } from "zod";

/** Step names go into job ids and Redis keys: lower-case words, no ':'. */
export const STEP_NAME = /^[a-z][a-z0-9-]{0,39}$/;

/** Fields every part payload carries beside its ids: its step, its index in that step and the step's count of parts. */
export const PART_FIELDS = {
  step: z.string().regex(STEP_NAME),
  part: z.number().int().min(0),
  parts: z.number().int().min(1),
};
export interface PartFields {
  step: string;
  part: number;
  parts: number;
}
