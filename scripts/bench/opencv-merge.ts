// OpenCV's MergeDebevec (python3-opencv) on 8-bit frames we hand it as raw
// codes, so both sides merge identical pixels (two JPEG decoders may differ by
// a code). The response is linear, response[z] = z, as OpenCV's own default.
// Only process() is timed, inside Python.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { runSystemPython } from "./system-python";

const SCRIPT = `
import sys, json, time
import numpy as np, cv2
d = sys.argv[1]
spec = json.load(open(d + "/spec.json"))
w, h = spec["width"], spec["height"]
imgs = [np.fromfile(d + "/frame-%d.raw" % k, dtype=np.uint8).reshape(h, w, 3) for k in range(len(spec["exposuresS"]))]
times = np.array(spec["exposuresS"], dtype=np.float32)
response = np.repeat(np.arange(256, dtype=np.float32).reshape(256, 1, 1), 3, axis=2)
merge = cv2.createMergeDebevec()
t0 = time.perf_counter()
out = merge.process(imgs, times, response)
ms = (time.perf_counter() - t0) * 1000
np.ascontiguousarray(out, dtype=np.float32).tofile(d + "/out.raw")
print(json.dumps({"processMs": ms, "threads": cv2.getNumThreads(), "version": cv2.__version__}))
`;

export interface OpenCvMergeResult {
  /** Radiance per channel in the order given (interleaved channel c of the input is plane c). */
  planes: Float32Array[];
  processMs: number;
  threads: number;
  version: string;
}

/** `frames[k]` holds interleaved 3-channel codes, width x height. */
export function mergeWithOpenCvDebevec(frames: Uint8Array[], width: number, height: number, exposuresS: number[]): OpenCvMergeResult {
  const dir = mkdtempSync(join(tmpdir(), "crownlight-opencv-"));
  try {
    writeFileSync(join(dir, "spec.json"), JSON.stringify({ width, height, exposuresS }));
    frames.forEach((codes, k) => writeFileSync(join(dir, `frame-${k}.raw`), codes));
    const info = JSON.parse(runSystemPython(SCRIPT, [dir], ["numpy", "cv2"]));
    const bytes = readFileSync(join(dir, "out.raw"));
    const interleaved = new Float32Array(bytes.buffer, bytes.byteOffset, bytes.byteLength / 4);
    const n = width * height;
    const planes = [0, 1, 2].map((c) => {
      const plane = new Float32Array(n);
      for (let i = 0; i < n; i++) plane[i] = interleaved[i * 3 + c];
      return plane;
    });
    return { planes, processMs: info.processMs, threads: info.threads, version: info.version };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
