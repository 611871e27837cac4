// Work over whole planes cut into ranges of rows, columns or pixels, run on the
// calling thread or spread over threads that share the planes' memory. A kernel
// is a named function over a range whose arithmetic for each unit (a row, a
// column, a pixel) is that unit's own, so any cut gives the same numbers bit for
// bit: a runner only ever makes the work faster, never different. lib/imaging
// stays pure: the threads themselves live in lib/reduction-runner (plane-pool.ts),
// whose workers find each kernel by name in plane-kernels.ts.

/**
 * One step of work over units [start, end) of `units` (rows, columns or pixel
 * indices, as the kernel says). It writes only what its units own and reads
 * nothing another unit of the same run writes. Its scratch is allocated before
 * it writes anything, so that a piece a thread could not finish never leaves a
 * half-written unit behind.
 */
export interface PlaneKernel<A> {
  readonly name: string;
  readonly run: (args: A, start: number, end: number) => void;
}

/** A kernel known by its name to every thread of a runner (plane-kernels.ts lists them all). */
export function definePlaneKernel<A>(name: string, run: (args: A, start: number, end: number) => void): PlaneKernel<A> {
  return { name, run };
}

/**
 * Runs kernels over ranges. The arrays a kernel reads or writes come from the
 * runner's own allocations (memory its threads share; plain arrays on one
 * thread); a run given any other array is done on the calling thread alone,
 * which gives the same numbers. Kernel arguments are plain data: typed arrays
 * (or lists of them), numbers, strings, booleans, undefined.
 */
export interface PlaneRunner {
  /**
   * A Float32Array its kernels may use, zeroed; with `written`, the caller
   * writes every element before it reads any, and a reused array is not zeroed.
   */
  float32(length: number, written?: boolean): Float32Array;
  /** A Float64Array its kernels may use (as float32). */
  float64(length: number, written?: boolean): Float64Array;
  /** A Uint8Array its kernels may use (as float32). */
  uint8(length: number, written?: boolean): Uint8Array;
  /** A Uint16Array its kernels may use (as float32). */
  uint16(length: number, written?: boolean): Uint16Array;
  /** kernel.run over [0, units), in pieces on any of the runner's threads; returns when every piece is done. */
  run<A>(kernel: PlaneKernel<A>, args: A, units: number): void;
  /**
   * Says that the caller will not look at these arrays again (its own allocations
   * among them, undefined and others ignored): the runner may hand their memory
   * out again. Shared memory is given back to the system only by a full garbage
   * collection, which its allocations do not prompt as ordinary arrays' do, so a
   * pool reuses it instead.
   */
  release(...arrays: (ArrayBufferView | undefined)[]): void;
  /** Gives back the memory kept for reuse, between phases whose planes differ (the renditions). */
  trim(): void;
}

/**
 * The array in memory the runner's threads share: itself when it is there already
 * (or the runner has one thread), else a copy in the runner's memory, which the
 * caller releases. `copied` says which.
 */
export function inRunnerMemory<T extends Float32Array | Uint8Array>(runner: PlaneRunner, array: T): { array: T; copied: boolean } {
  if (runner === SERIAL_PLANE_RUNNER || array.buffer instanceof SharedArrayBuffer) return { array, copied: false };
  const copy = (array instanceof Float32Array ? runner.float32(array.length, true) : runner.uint8(array.length, true)) as T;
  copy.set(array);
  return { array: copy, copied: true };
}

/** Where a reader of pixel data may put the arrays it reads (a frame spill, a work piece). */
export interface ArrayMemory {
  float32: (length: number) => Float32Array;
  uint8: (length: number) => Uint8Array;
}

/**
 * Memory of the runner's lent to readers (so that its threads use what they read
 * as it is, not copies), and its return: giveBack hands every array lent since
 * the last giveBack to the runner again. Call it once nothing looks at them.
 */
export function lendRunnerMemory(runner: PlaneRunner): { memory: ArrayMemory; giveBack: () => void } {
  const lent: ArrayBufferView[] = [];
  const lend = <T extends ArrayBufferView>(array: T): T => {
    lent.push(array);
    return array;
  };
  return {
    memory: { float32: (length) => lend(runner.float32(length, true)), uint8: (length) => lend(runner.uint8(length, true)) },
    giveBack: () => {
      runner.release(...lent);
      lent.length = 0;
    },
  };
}

/** The calling thread alone: plain arrays, each run as one range. */
export const SERIAL_PLANE_RUNNER: PlaneRunner = {
  float32: (length) => new Float32Array(length),
  float64: (length) => new Float64Array(length),
  uint8: (length) => new Uint8Array(length),
  uint16: (length) => new Uint16Array(length),
  run(kernel, args, units) {
    if (units > 0) kernel.run(args, 0, units);
  },
  // Ordinary arrays go with their last reference.
  release: () => undefined,
  trim: () => undefined,
};

/**
 * Math.hypot(dx, dy) bit for bit, without the builtin's call: V8 (src/builtins/
 * builtins-math.cc, MathHypot) divides each argument by the larger magnitude m,
 * adds the squares in argument order with Kahan's compensation (which is zero
 * after the first term) and returns sqrt(sum) m; the larger term's square is
 * exactly 1, and 1 + t^2 = t^2 + 1, so this is sqrt(1 + t^2) m with t the
 * smaller magnitude over m. For finite arguments (tests/unit/imaging/plane-runner.test.ts
 * compares the two on pixel grids).
 */
export function computeHypot(dx: number, dy: number): number {
  const a = dx < 0 ? -dx : dx;
  const b = dy < 0 ? -dy : dy;
  const m = a > b ? a : b;
  if (m === 0) return 0;
  const t = (a > b ? b : a) / m;
  return Math.sqrt(1 + t * t) * m;
}
