// Every test file that writes EXIF (directly or through the synthetic-bracket
// writers) starts one ExifTool process; end it when the file is done, or it
// outlives the test run.
import { afterAll } from "vitest";
import { closeExifWriter } from "@/lib/media/exif-write";

afterAll(async () => {
  await closeExifWriter();
});
