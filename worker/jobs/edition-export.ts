import type { JobHandler } from "@/lib/queue/job-context";
import { runExportJob } from "@/lib/editions/export/run";

/** Makes one print bundle; the export's states are lib/editions/export/run.ts's. */
export const exportEdition: JobHandler<"edition.export"> = (ctx) => runExportJob(ctx);
