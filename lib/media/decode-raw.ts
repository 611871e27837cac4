// Camera raw through LibRaw's dcraw_emu (Debian libraw-bin):
// -4 linear 16-bit output (no gamma, no auto-brightness), -T TIFF, -w the
// camera's white balance, -o 1 sRGB primaries (still linear), -Z the output path,
// and -c 0: by default (threshold 0.75) LibRaw replaces the white level by the
// frame's own brightest value when that is near saturation, which would scale
// the bright frames of a bracket differently from the dark ones. With -c 0
// LibRaw subtracts the black level and maps the file's white level to 65535 in
// every frame (before white balance multipliers, which -w applies).
import { execFile } from "node:child_process";
import { mkdtemp, rm, stat, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { MediaError } from "./errors";
import { decodeRaster, type RasterPixels } from "./decode-raster";

export const DCRAW_EMU = "/usr/bin/dcraw_emu";
/** A 60-megapixel raw decodes in a few seconds here; a hang is a broken file or a stuck process. */
export const RAW_DECODE_TIMEOUT_MS = 120_000;

/** Resolves with stderr: dcraw_emu exits 0 even when it cannot open the file, so callers check the output. */
function runDcrawEmu(args: string[]): Promise<string> {
  return new Promise((resolve, reject) => {
    execFile(DCRAW_EMU, args, { timeout: RAW_DECODE_TIMEOUT_MS, maxBuffer: 1 << 20 }, (error, _stdout, stderr) => {
      if (error) reject(Object.assign(error, { stderr: String(stderr) }));
      else resolve(String(stderr));
    });
  });
}

function lastLine(text: string): string {
  return text.trim().split("\n").pop()?.trim() ?? "";
}

export async function decodeCameraRaw(input: Buffer | string, name: string): Promise<RasterPixels> {
  const dir = await mkdtemp(join(tmpdir(), "crownlight-raw-"));
  try {
    const inPath = typeof input === "string" ? input : join(dir, "frame.raw");
    if (typeof input !== "string") await writeFile(inPath, input);
    const outPath = join(dir, "frame.tiff");
    let stderr = "";
    try {
      stderr = await runDcrawEmu(["-4", "-T", "-w", "-o", "1", "-c", "0", "-Z", outPath, inPath]);
    } catch (error) {
      const failure = error as NodeJS.ErrnoException & { killed?: boolean; stderr?: string };
      if (failure.code === "ENOENT") {
        throw new MediaError("raw-decode-failed", name, `camera raw needs ${DCRAW_EMU} (Debian package libraw-bin), which is not installed`);
      }
      if (failure.killed) throw new MediaError("raw-decode-failed", name, `the raw decoder took longer than ${RAW_DECODE_TIMEOUT_MS / 1000} s and was stopped`);
      const detail = lastLine(failure.stderr ?? "") || failure.message;
      throw new MediaError("raw-decode-failed", name, `LibRaw cannot decode the raw file: ${detail}`, { cause: error });
    }
    if (!(await stat(outPath).catch(() => null))) {
      const detail = lastLine(stderr).replace(inPath, name) || "no output";
      throw new MediaError("raw-decode-failed", name, `LibRaw cannot decode the raw file: ${detail}`);
    }
    return await decodeRaster(outPath, name);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
