#!/usr/bin/env node
// Runs the loopclose CLI of a build in this process and prints its CPU time (user + system, ms,
// this thread and any worker threads) to standard error as `cpu-ms N` when the process exits:
// whole-process CPU beside the wall time that bench/run.mjs and bench/compare-cli.mjs take.
//   node bench/cli-cpu.mjs DIR/bin/loopclose.js ARGS...
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const [bin, ...args] = process.argv.slice(2);
process.on('exit', () => {
  const u = process.cpuUsage();
  process.stderr.write(`cpu-ms ${((u.user + u.system) / 1000).toFixed(1)}\n`);
});
const cli = await import(pathToFileURL(resolve(bin, '..', '..', 'dist', 'cli.mjs')).href);
await cli.main([process.argv[0], bin, ...args]);
