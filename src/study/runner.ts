/**
 * Runs blocks of rows, in this thread or on worker threads, and hands the rows to the writer in
 * the serial order: block after block as listed, each block's rows in walk order. A sweep's
 * blocks of points (sweep.ts, dist/worker.mjs) and a reconciliation's blocks of historian rows
 * (src/plant/rows.ts, dist/plant-worker.mjs) run the same way.
 *
 * With --jobs N, this thread and N - 1 worker threads take blocks in order from one queue,
 * whoever is free; rows of a block that is not yet the one being written are held until it is. Since a block is solved
 * the same way wherever it runs (sweep.ts, rows.ts), the rows are the same as in a serial run.
 */
import { Worker } from 'node:worker_threads';
import { blockRows, type PointRow, type SweepContext } from './sweep.js';

export interface Task {
  block: number;
  /** Leading points of the block already written (resume). */
  skip: number;
}

export type ToWorker = Task;
export type FromWorker<R = PointRow> =
  | { type: 'ready' }
  | { type: 'row'; block: number; row: R }
  | { type: 'done'; block: number }
  | { type: 'error'; message: string; stack?: string };

export interface RunHooks<R = PointRow> {
  onRow(row: R): void;
  /** Polled between points: true stops the run (interrupt). */
  stopped(): boolean;
}

/** Blocks of rows of one kind: solved here, or prepared again in a worker from plain data. */
export interface Blocks<R> {
  /** The rows of a block (its first `skip` rows solved but not yielded), in this thread. */
  rows(block: number, skip: number): Iterable<R>;
  /** What a worker thread prepares the same blocks from (structured-cloned: plain data). */
  workerData: unknown;
}

/** A sweep's blocks of points. */
export function sweepBlocks(ctx: SweepContext): Blocks<PointRow> {
  return { rows: (block, skip) => blockRows(ctx, block, skip), workerData: { spec: ctx.spec } };
}

/** Longest stretch of solving before the event loop gets a turn (signals, stdout). */
const SLICE_MS = 50;

const turn = () => new Promise<void>((r) => setImmediate(r));

/** Serial run of a sweep; resolves true when every task is done, false when stopped. */
export function runSerial(ctx: SweepContext, tasks: readonly Task[], hooks: RunHooks): Promise<boolean> {
  return runBlocksSerial(sweepBlocks(ctx), tasks, hooks);
}

/** Serial run of any blocks; resolves true when every task is done, false when stopped. */
export async function runBlocksSerial<R>(blocks: Blocks<R>, tasks: readonly Task[], hooks: RunHooks<R>): Promise<boolean> {
  let sliceStart = Date.now();
  for (const t of tasks) {
    for (const row of blocks.rows(t.block, t.skip)) {
      hooks.onRow(row);
      if (Date.now() - sliceStart >= SLICE_MS) {
        await turn();
        sliceStart = Date.now();
      }
      if (hooks.stopped()) return false;
    }
  }
  return true;
}

export class WorkerFailure extends Error {
  constructor(message: string, readonly workerStack?: string) {
    super(message);
    this.name = 'WorkerFailure';
  }
}

/** The worker script next to the bundled CLI (dist/worker.mjs). */
export function defaultWorkerFile(): URL {
  return new URL('./worker.mjs', import.meta.url);
}

/**
 * Runs a sweep on `jobs` threads: this one and jobs - 1 worker threads (this thread starts
 * solving at once, while the workers load). Resolves true when every task is done, false when stopped.
 */
export function runParallel(ctx: SweepContext, tasks: readonly Task[], jobs: number, hooks: RunHooks, workerFile: URL = defaultWorkerFile()): Promise<boolean> {
  return runBlocksParallel(sweepBlocks(ctx), tasks, jobs, hooks, workerFile);
}

/** Any blocks on `jobs` threads; `workerFile` prepares them from blocks.workerData. */
export function runBlocksParallel<R>(blocks: Blocks<R>, tasks: readonly Task[], jobs: number, hooks: RunHooks<R>, workerFile: URL): Promise<boolean> {
  return new Promise<boolean>((resolve, reject) => {
    const index = new Map<number, number>(tasks.map((t, k) => [t.block, k]));
    const buffers: R[][] = tasks.map(() => []);
    const done: boolean[] = tasks.map(() => false);
    let cursor = 0;
    let next = 0;
    let settled = false;
    const workers: Worker[] = [];
    let poll: ReturnType<typeof setInterval> | undefined;
    const finish = (ok: boolean | Error) => {
      if (settled) return;
      settled = true;
      if (poll) clearInterval(poll);
      for (const w of workers) void w.terminate();
      if (ok instanceof Error) reject(ok);
      else resolve(ok);
    };
    const take = (): Task | undefined => (next < tasks.length ? tasks[next++] : undefined);
    const give = (w: Worker) => {
      const t = take();
      if (t) w.postMessage(t satisfies ToWorker);
    };
    const row = (block: number, r: R) => {
      const t = index.get(block)!;
      if (t === cursor) hooks.onRow(r);
      else buffers[t].push(r);
    };
    const blockDone = (block: number) => {
      done[index.get(block)!] = true;
      while (cursor < tasks.length && done[cursor]) {
        cursor++;
        if (cursor < tasks.length) {
          for (const r of buffers[cursor]) hooks.onRow(r);
          buffers[cursor] = [];
        }
      }
      if (cursor >= tasks.length) finish(true);
    };
    if (tasks.length === 0) return finish(true);
    const n = Math.max(0, Math.min(jobs, tasks.length) - 1);
    for (let k = 0; k < n; k++) {
      const w = new Worker(workerFile, { workerData: blocks.workerData });
      workers.push(w);
      w.on('message', (m: FromWorker<R>) => {
        if (settled) return;
        switch (m.type) {
          case 'ready':
            give(w);
            break;
          case 'row':
            row(m.block, m.row);
            break;
          case 'done':
            blockDone(m.block);
            give(w);
            break;
          case 'error':
            finish(new WorkerFailure(m.message, m.stack));
            return;
        }
        if (hooks.stopped()) finish(false);
      });
      w.on('error', (e) => finish(new WorkerFailure(e.message, e.stack)));
      w.on('exit', (code) => {
        if (!settled) finish(new WorkerFailure(`a worker thread stopped (exit code ${code}) before the run was done`));
      });
    }
    // This thread's lane: blocks from the same queue, with turns for the workers' messages.
    const local = async () => {
      let sliceStart = Date.now();
      for (let t = take(); t && !settled; t = take()) {
        for (const r of blocks.rows(t.block, t.skip)) {
          if (settled) return;
          row(t.block, r);
          if (Date.now() - sliceStart >= SLICE_MS) {
            await turn();
            sliceStart = Date.now();
            if (hooks.stopped()) return finish(false);
          }
        }
        blockDone(t.block);
        await turn();
        sliceStart = Date.now();
      }
    };
    local().catch((e: unknown) => finish(e instanceof Error ? e : new Error(String(e))));
    // A signal arrives between messages too.
    poll = setInterval(() => {
      if (hooks.stopped()) finish(false);
    }, 50);
  });
}
