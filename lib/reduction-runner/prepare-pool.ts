// Two worker threads that decode frames (and search each for the bracket's
// defects), run the per-frame stage of the pipeline (linearize, masks, limb
// fit) and compare the pairs of the registration side by side, so both cores
// work while the main thread only waits. Arrays
// come back by transfer. A worker that cannot start or a frame that fails gives
// `undefined`, and the caller does that frame on its own thread: the pool only
// ever makes a reduction faster, never different.
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import type { DecodedFrame } from "@/lib/media";
import type { PreparedFrame } from "@/lib/imaging/pipeline";
import type { RegistrationPairOutcome, RegistrationPairTask } from "@/lib/imaging/register";
import type { LinearFrame, ReductionParams } from "@/lib/imaging/types";
import type { SpilledFile } from "./frame-spill";
import type { PlaneSource, PrepareReply, PrepareRequest } from "./prepare-messages";

/** Workers in the pool: the machines have two cores. */
export const PREPARE_WORKERS = 2;

export interface PooledDecode {
  decoded: DecodedFrame;
  /** The frame's outliers (findFrameOutliers), when asked for and the frame is linear. */
  outliers?: Uint32Array;
  /** The planes' files in the spill folder given (decoded.image.planes then holds empty arrays, one per plane). */
  spilled?: SpilledFile[];
}

export interface PreparePool {
  /**
   * Decodes a file, and with findOutliers searches it for defects; with spillDir
   * (a frame spill's folder) the worker writes the planes there, for the spill to
   * adopt. Undefined when the worker could not.
   */
  decode(path: string, name: string, findOutliers: boolean, spillDir?: string): Promise<PooledDecode | undefined>;
  /**
   * prepareFrame(frame, params) (with the sRGB table for 8-bit frames) in a worker;
   * `files` are the frame's planes spilled to disk, which the worker reads itself
   * (else the planes are copied to it). Undefined when the worker could not.
   */
  prepare(frame: LinearFrame, params: ReductionParams, files?: SpilledFile[]): Promise<PreparedFrame | undefined>;
  /** refineRegistrationPair(task) in a worker (the task's images are copied to it); undefined when the worker could not. */
  registerPair(task: RegistrationPairTask): Promise<RegistrationPairOutcome | undefined>;
  close(): Promise<void>;
}

/**
 * The worker is TypeScript, and Node 20 does not apply a loader given with
 * --import to a worker's own entry file: a small script registers tsx's loader
 * first and then imports the worker module through it.
 */
function workerBootScript(entry: string): string {
  // The ESM entry of "tsx/esm/api", found through the package's own export map.
  const packagePath = createRequire(import.meta.url).resolve("tsx/package.json");
  const { exports } = JSON.parse(readFileSync(packagePath, "utf8")) as { exports: Record<string, { import: { default: string } }> };
  const tsxApi = pathToFileURL(join(dirname(packagePath), exports["./esm/api"].import.default)).href;
  return `import(${JSON.stringify(tsxApi)}).then((tsx) => { tsx.register(); return import(${JSON.stringify(entry)}); });`;
}

/** This process's flags without tsx's own loader, which the boot script registers. */
function workerExecArgv(): string[] {
  const flags: string[] = [];
  for (let k = 0; k < process.execArgv.length; k++) {
    const flag = process.execArgv[k];
    if ((flag === "--import" || flag === "--require") && /[\\/]tsx[\\/]/.test(process.execArgv[k + 1] ?? "")) k++;
    else flags.push(flag);
  }
  return flags;
}

interface Lane {
  worker: Worker;
  pending: Map<number, (reply: PrepareReply | undefined) => void>;
  isDead: boolean;
}

/**
 * A worker thread running a TypeScript module of ours (through tsx's loader, as this process does),
 * with this process's flags less those a worker refuses (V8's per-process ones such as --expose-gc,
 * which the benches use, are named in Node's refusal).
 */
export function startTypeScriptWorker(entry: URL): Worker {
  const script = workerBootScript(entry.href);
  const flags = workerExecArgv();
  try {
    return new Worker(script, { eval: true, execArgv: flags });
  } catch (error) {
    if ((error as { code?: string }).code !== "ERR_WORKER_INVALID_EXEC_ARGV") throw error;
    const refused = new Set(String((error as Error).message).replace(/^[^:]*:\s*/, "").split(/,\s*/));
    return new Worker(script, { eval: true, execArgv: flags.filter((f) => !refused.has(f)) });
  }
}

function startLane(): Lane {
  const worker = startTypeScriptWorker(new URL("./prepare-worker.ts", import.meta.url));
  const lane: Lane = { worker, pending: new Map(), isDead: false };
  const failAll = () => {
    lane.isDead = true;
    for (const resolve of lane.pending.values()) resolve(undefined);
    lane.pending.clear();
  };
  worker.on("message", (reply: PrepareReply) => {
    lane.pending.get(reply.id)?.(reply);
    lane.pending.delete(reply.id);
  });
  worker.on("error", failAll);
  worker.on("exit", failAll);
  return lane;
}

export function createPreparePool(size = PREPARE_WORKERS): PreparePool {
  const lanes = Array.from({ length: size }, startLane);
  let nextId = 0;
  const send = (request: PrepareRequest): Promise<PrepareReply | undefined> => {
    const alive = lanes.filter((l) => !l.isDead);
    if (alive.length === 0) return Promise.resolve(undefined);
    const lane = alive.reduce((best, l) => (l.pending.size < best.pending.size ? l : best));
    return new Promise((resolve) => {
      lane.pending.set(request.id, resolve);
      // Planes sent as arrays are copied, never moved: the caller's frame keeps them whatever the worker does.
      lane.worker.postMessage(request);
    });
  };
  return {
    async decode(path, name, findOutliers, spillDir) {
      const reply = await send({ kind: "decode", id: nextId++, path, name, findOutliers, spillDir });
      return reply?.ok && "decoded" in reply ? { decoded: reply.decoded, outliers: reply.outliers, spilled: reply.spilled } : undefined;
    },
    async prepare(frame, params, files) {
      const { image, ...rest } = frame;
      const source: PlaneSource = files ? { files } : { planes: image.planes };
      const reply = await send({ kind: "prepare", id: nextId++, frame: rest, width: image.width, height: image.height, source, params });
      if (!(reply?.ok && "prepared" in reply)) return undefined;
      const { prepared } = reply;
      prepared.linear.masked = frame.badPixels;
      return prepared;
    },
    async registerPair(task) {
      const reply = await send({ kind: "register-pair", id: nextId++, task });
      return reply?.ok && "pair" in reply ? reply.pair : undefined;
    },
    async close() {
      await Promise.all(lanes.map((l) => l.worker.terminate()));
    },
  };
}
