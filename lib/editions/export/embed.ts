// ExifTool for the print bundle: one long-lived process with the AVM namespace
// configured (avm.exiftool-config beside this file; ExifTool's -config must
// come before its other arguments). Writes the tags of metadata.ts into a
// file in place and reads them back, for the bundle and for the tests.
import { join } from "node:path";
import { DefaultExiftoolArgs, ExifTool, type WriteTags } from "exiftool-vendored";
import type { ExifTagValue } from "./metadata";

export const AVM_CONFIG_PATH = join(process.cwd(), "lib/editions/export/avm.exiftool-config");

let exiftool: ExifTool | undefined;

export function exportExifTool(): ExifTool {
  exiftool ??= new ExifTool({ maxProcs: 1, exiftoolArgs: ["-config", AVM_CONFIG_PATH, ...DefaultExiftoolArgs] });
  return exiftool;
}

export async function closeExportExifTool(): Promise<void> {
  const running = exiftool;
  exiftool = undefined;
  await running?.end();
}

/** Writes the tags into the file in place; ExifTool's warnings become an error naming the file. */
export async function embedTags(path: string, tags: Record<string, ExifTagValue>): Promise<void> {
  await exportExifTool().write(path, tags as unknown as WriteTags, { writeArgs: ["-overwrite_original"] });
}

/** Group-qualified tags of a file with numbers as numbers (ExifTool -G1 -n). */
export async function readTags(path: string, groups: string[] = ["-XMP:all", "-GPS:all", "-ICC_Profile:ProfileDescription", "-IFD0:all", "-JFIF:all"]): Promise<Record<string, unknown>> {
  return (await exportExifTool().readRaw(path, { readArgs: ["-G1", "-n", ...groups] })) as Record<string, unknown>;
}

/** The description inside a file's embedded ICC profile, or null. */
export async function readProfileDescription(path: string): Promise<string | null> {
  const tags = await readTags(path, ["-ICC_Profile:ProfileDescription"]);
  const d = tags["ICC_Profile:ProfileDescription"];
  return typeof d === "string" ? d : null;
}
