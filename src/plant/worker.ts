/**
 * A worker thread of `loopclose reconcile --readings F.csv --jobs N` (dist/plant-worker.mjs). It
 * prepares the rows from the same plain spec as the main thread (the flowsheet and export texts,
 * the block size and the options), then reconciles the blocks it is handed, one row message per
 * historian row. A block is solved the same way on any thread (rows.ts), so the lines are the
 * serial run's.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { FromWorker, ToWorker } from '../study/runner.js';
import { prepareRows, rowsOfBlock, type RowOut, type RowsSpec } from './rows.js';

const port = parentPort;
if (!port) throw new Error('plant-worker.mjs runs as a worker thread of a reconciliation');

const post = (m: FromWorker<RowOut>) => port.postMessage(m);
const failure = (e: unknown): FromWorker<RowOut> => ({ type: 'error', message: e instanceof Error ? e.message : String(e), stack: e instanceof Error ? e.stack : undefined });

try {
  const ctx = prepareRows((workerData as { spec: RowsSpec }).spec);
  port.on('message', (m: ToWorker) => {
    try {
      for (const row of rowsOfBlock(ctx, m.block, m.skip)) post({ type: 'row', block: m.block, row });
      post({ type: 'done', block: m.block });
    } catch (e) {
      post(failure(e));
    }
  });
  post({ type: 'ready' });
} catch (e) {
  post(failure(e));
}
