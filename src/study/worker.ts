/**
 * A worker thread of a sweep (dist/worker.mjs). It prepares the sweep from the same plain
 * spec as the main thread, then solves the blocks it is handed, one row message per point.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { blockRows, prepareSweep, type SweepSpec } from './sweep.js';
import type { FromWorker, ToWorker } from './runner.js';

const port = parentPort;
if (!port) throw new Error('worker.mjs runs as a worker thread of a sweep');

const post = (m: FromWorker) => port.postMessage(m);

try {
  // The main thread prepared the same spec (every axis value checked) before starting this one.
  const ctx = prepareSweep((workerData as { spec: SweepSpec }).spec, { checked: true });
  port.on('message', (m: ToWorker) => {
    try {
      for (const row of blockRows(ctx, m.block, m.skip)) post({ type: 'row', block: m.block, row });
      post({ type: 'done', block: m.block });
    } catch (e) {
      post({ type: 'error', message: e instanceof Error ? e.message : String(e), stack: e instanceof Error ? e.stack : undefined });
    }
  });
  post({ type: 'ready' });
} catch (e) {
  post({ type: 'error', message: e instanceof Error ? e.message : String(e), stack: e instanceof Error ? e.stack : undefined });
}
