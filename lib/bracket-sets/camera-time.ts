// A frame's capture time as the camera clock showed it, in SQL: the time the
// photographer gave, else the file's. Orderings and groupings use it.
import { sql, type SQL } from "drizzle-orm";
import { frames } from "@/db/schema";

export const cameraCaptureAt: SQL<Date | null> = sql<Date | null>`coalesce(${frames.givenCaptureAt}, ${frames.captureAt})`;
