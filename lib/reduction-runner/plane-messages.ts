// What the plane pool (plane-pool.ts) hands its worker threads (plane-worker.ts).

/** Slots of a run's control array (an Int32Array on a SharedArrayBuffer). */
export const CONTROL = {
  /** The next piece to take (each thread adds 1 and takes what it got, while below the count). */
  next: 0,
  /** Pieces finished, done or failed; the calling thread waits on it. */
  finished: 1,
  /** Pieces the workers did. */
  byWorkers: 2,
  /** From here on, one slot a piece: PIECE_DONE or PIECE_FAILED once finished. */
  status: 3,
} as const;

export const PIECE_DONE = 1;
export const PIECE_FAILED = 2;

/** One run of a kernel: its pieces are units bounds[k] to bounds[k + 1]. */
export interface PlaneJob {
  kernel: string;
  args: unknown;
  control: Int32Array;
  bounds: Int32Array;
}

/** A worker's first message, once its kernels are loaded. */
export interface PlaneWorkerReady {
  ready: true;
}

/** Asks a worker for a full garbage collection (its references to planes the caller let go); it stores 1 into `collect` when done. */
export interface PlaneCollect {
  collect: Int32Array;
}
