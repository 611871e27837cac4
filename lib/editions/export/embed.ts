// ExifTool for the print bundle: one long-lived process with the AVM namespace
// configured (avm.exiftool-config beside this file; ExifTool's -config must
// come before its other arguments). Writes the tags of metadata.ts into a
// file in place and reads them back, for the bundle and for the tests.
import { existsSync } from "node:fs";
import { basename, join } from "node:path";
import { DefaultExiftoolArgs, ExifTool, type WriteTags } from "exiftool-vendored";
import { AppError } from "@/lib/errors";
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

/**
 * Writes the tags into the file in place. ExifTool reports a tag it refused
 * (an unknown AVM tag when the config is missing, a malformed value) as a
 * warning, not an error: any warning fails the write with the file's name.
 */
export async function embedTags(path: string, tags: Record<string, ExifTagValue>): Promise<void> {
  if (!existsSync(AVM_CONFIG_PATH)) throw new AppError("internal", `The ExifTool configuration for AVM is missing at ${AVM_CONFIG_PATH}; run the worker from the project folder.`);
  const result = await exportExifTool().write(path, tags as unknown as WriteTags, { writeArgs: ["-overwrite_original"] });
  const warnings = (result.warnings ?? []).filter((w) => !/Nothing to (do|write)/i.test(w));
  if (warnings.length) throw new AppError("invalid_input", `ExifTool refused metadata for ${basename(path)}: ${warnings.join("; ")}`);
}

/** Group-qualified tags of a file with numbers as numbers (ExifTool -G1 -n). */
export async function readTags(path: string, groups: string[] = ["-XMP:all", "-GPS:all", "-ICC_Profile:ProfileDescription", "-IFD0:all", "-JFIF:all"]): Promise<Record<string, unknown>> {
  return (await exportExifTool().readRaw(path, { readArgs: ["-G1", "-n", ...groups] })) as Record<string, unknown>;
}
