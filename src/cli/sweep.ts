/**
 * `loopclose sweep FILE --grid PATH=START:STOP:N [UNIT] [--values PATH=a,b,c [UNIT]] ...`:
 * the flowsheet solved over a grid of inputs, one output line per point, resumable, on worker
 * threads or in shards.
 */
import type { Command } from 'commander';
import { InputError } from '../diagnostics.js';
import { readFlowsheetFile } from '../flowsheet/validate.js';
import type { MethodName } from '../solve/types.js';
import type { AxisSpec } from '../study/grid.js';
import { parseOutput } from '../study/outputs.js';
import { Progress } from '../study/progress.js';
import { headerText, makeHeader, rowText, type SweepFormat } from '../study/records.js';
import { runParallel, runSerial, WorkerFailure, type Task } from '../study/runner.js';
import { parseShard, shardBlocks, shardFromEnvironment, type Shard } from '../study/shard.js';
import { SweepSink } from '../study/sink.js';
import { DEFAULT_BLOCK, prepareSweep, type SweepSpec } from '../study/sweep.js';
import { EXIT } from './exit.js';
import { isStandardOutput, writeErr } from './io.js';

export interface SweepCliOptions {
  report?: string[];
  target?: string[];
  by?: string[];
  within?: string[];
  jsonl?: boolean;
  out?: string;
  resume?: boolean;
  overwrite?: boolean;
  jobs?: string;
  shard?: string;
  block?: string;
  continuation: boolean;
  method?: string;
  maxPasses?: string;
  tolerance?: string;
}

const collect = (v: string, prev: string[] | undefined) => [...(prev ?? []), v];

/** Adds `sweep` to the program; `setCode` receives the exit code. */
export function registerSweep(program: Command, setCode: (code: number) => void): void {
  // --grid and --values are kept in the order given: the first axis is the slowest.
  let axes: AxisSpec[] = [];
  program
    .command('sweep')
    .description('solve a flowsheet over a grid of inputs; one output line per point (CSV, or JSON Lines)')
    .argument('<file>', 'flowsheet file')
    .option('--grid <spec>', 'PATH=START:STOP:N [UNIT]: N values from START to STOP, e.g. "feeds.hydrogen.meter.flow=10:14:9 m3/h" (repeatable)', (v: string) => {
      axes.push({ kind: 'grid', text: v });
      return undefined;
    })
    .option('--values <spec>', 'PATH=a,b,c [UNIT]: listed values, e.g. "reactor.reactions.0.conversion=0.2,0.25,0.3" (repeatable)', (v: string) => {
      axes.push({ kind: 'values', text: v });
      return undefined;
    })
    .option('--report <outputs>', 'outputs by path, comma-separated; a display unit in brackets, e.g. "streams.purge.flows.H2[kmol/h],loop.recycle-ratio" (repeatable)', collect)
    .option('--target <spec>', 'at every point hold an output at a value, e.g. "streams.recycle.fractions.N2 = 0.10" (repeatable)', collect)
    .option('--by <input>', 'the input adjusted for the matching --target', collect)
    .option('--within <low:high>', 'bounds of that input, e.g. 0.001:0.2', collect)
    .option('--jsonl', 'write JSON Lines instead of CSV')
    .option('--out <file>', 'write to a file (needed for --resume)')
    .option('--resume', 'continue an interrupted sweep in --out: only the missing points are solved')
    .option('--overwrite', 'start again when --out exists')
    .option('--jobs <n>', 'threads solving points (the output is the same as with one)')
    .option('--shard <i/N>', 'solve only share i of N of the points (merge the shares with `loopclose merge`); `auto` takes i and N from an array job (Slurm, Grid Engine)')
    .option('--block <n>', `points solved in a row from one cold start (default ${DEFAULT_BLOCK})`)
    .option('--no-continuation', 'start every point cold instead of from its neighbour')
    .option('--method <name>', 'direct, wegstein, newton, anderson or auto for every point (default: the file\'s method from a cold start, newton from a neighbour)')
    .option('--max-passes <n>', 'budget of flowsheet passes per point')
    .option('--tolerance <rtol>', 'relative tolerance on every tear variable (default: the file\'s, else 1e-10)')
    .action(async (file: string, o: SweepCliOptions) => {
      const specs = axes;
      axes = [];
      setCode(await runSweep(file, specs, o));
    });
}

function options(o: Required<Pick<SweepCliOptions, 'report' | 'target' | 'by' | 'within'>> & SweepCliOptions): { jobs: number; shard: Shard; block: number; method?: MethodName; maxPasses?: number; rtol?: number } {
  const errs: string[] = [];
  const int = (name: string, v: string | undefined, dflt: number): number => {
    if (v === undefined) return dflt;
    const n = Number(v);
    if (!/^\s*\d+\s*$/.test(v) || !Number.isInteger(n) || n < 1) {
      errs.push(`${name} must be a whole number >= 1, not \`${v}\``);
      return dflt;
    }
    return n;
  };
  const jobs = int('--jobs', o.jobs, 1);
  const block = int('--block', o.block, DEFAULT_BLOCK);
  const maxPasses = o.maxPasses === undefined ? undefined : int('--max-passes', o.maxPasses, 1);
  let method: MethodName | undefined;
  if (o.method !== undefined) {
    if (!['direct', 'wegstein', 'newton', 'anderson', 'auto'].includes(o.method)) errs.push(`--method: unknown method \`${o.method}\` (use direct, wegstein, newton, anderson or auto)`);
    else method = o.method as MethodName;
  }
  let rtol: number | undefined;
  if (o.tolerance !== undefined) {
    rtol = Number(o.tolerance);
    if (!(rtol > 0 && rtol < 0.1)) errs.push('--tolerance must be a number between 0 and 0.1');
  }
  if (o.by.length !== o.target.length) errs.push(`give one --by for each --target (${o.target.length} targets, ${o.by.length} --by)`);
  if (o.within.length > o.target.length) errs.push('more --within than --target');
  if (o.resume && o.overwrite) errs.push('give --resume or --overwrite, not both');
  if (o.resume && !o.out) errs.push('--resume needs --out FILE (the output to continue)');
  let shard: Shard = { index: 1, count: 1 };
  if (o.shard !== undefined) {
    try {
      shard = o.shard.trim() === 'auto' ? shardFromEnvironment() : parseShard(o.shard);
    } catch (e) {
      if (e instanceof InputError) errs.push(...e.diagnostics.map((d) => d.message));
      else throw e;
    }
  }
  if (errs.length) throw new InputError(errs.map((message) => ({ severity: 'error' as const, message })));
  return { jobs, shard, block, method, maxPasses, rtol };
}

/**
 * Test hook: LOOPCLOSE_INTERRUPT_AFTER=N[:SIGNAL] makes the sweep send itself SIGNAL (default
 * SIGKILL) once N rows are written, so that the interruption tests stop it at a known point
 * whatever the speed of the machine. It changes nothing else.
 */
function interruptHook(): { rows: number; signal: NodeJS.Signals } | undefined {
  const v = process.env.LOOPCLOSE_INTERRUPT_AFTER;
  const m = v ? /^(\d+)(?::(SIG[A-Z]+))?$/.exec(v) : null;
  return m ? { rows: Number(m[1]), signal: (m[2] ?? 'SIGKILL') as NodeJS.Signals } : undefined;
}

export async function runSweep(file: string, axes: AxisSpec[], given: SweepCliOptions): Promise<number> {
  const o = { ...given, report: given.report ?? [], target: given.target ?? [], by: given.by ?? [], within: given.within ?? [] };
  const opt = options(o);
  const spec: SweepSpec = {
    file,
    text: readFlowsheetFile(file),
    axes,
    report: o.report.flatMap((r) => r.split(',')).map((s) => s.trim()).filter(Boolean),
    targets: o.target.map((text, j) => ({ text, by: o.by[j], within: o.within[j] })),
    method: opt.method,
    maxPasses: opt.maxPasses,
    rtol: opt.rtol,
    block: opt.block,
    continuation: o.continuation,
  };
  const format: SweepFormat = o.jsonl ? 'jsonl' : 'csv';
  const ctx = prepareSweep(spec);
  if (format === 'csv') {
    // CSV is read by people: outputs without a unit of their own take the file's display units
    // (flows, pressures, temperatures); JSON Lines stays in SI.
    const d = ctx.model.display;
    const byDim: Partial<Record<string, string>> = { molarFlow: d.flowUnit, pressure: d.pressureUnit, temperature: d.temperatureUnit };
    const report = spec.report.map((r, k) => {
      const out = ctx.outputs[k];
      const unit = out && out.unit === undefined ? byDim[out.dimension] : undefined;
      return unit ? `${r}[${unit}]` : r;
    });
    if (report.some((r, k) => r !== spec.report[k])) {
      // Only the outputs change (each now with its unit): read them again, not the whole sweep
      // (the file, every grid value and the runtime, which are the same).
      spec.report = report;
      ctx.outputs = report.map((r) => parseOutput(r, ctx.model));
    }
  }
  const header = makeHeader(ctx, format, opt.shard);
  const blockIds = shardBlocks(ctx.blocks.map((_, b) => b), opt.shard);
  const total = blockIds.reduce((a, b) => a + ctx.blocks[b].length, 0);
  const order = new Int32Array(total);
  let at = 0;
  for (const b of blockIds) {
    order.set(ctx.blocks[b], at);
    at += ctx.blocks[b].length;
  }

  const { sink, existing } = SweepSink.open({ path: o.out && !isStandardOutput(o.out) ? o.out : undefined, resume: !!o.resume, overwrite: !!o.overwrite }, header, headerText(header), order);
  const tally = new Map<string, number>();
  for (const r of existing) tally.set(r.status, (tally.get(r.status) ?? 0) + 1);
  // Blocks already written are skipped; a block cut short is solved again from its cold start,
  // and only its missing rows are written.
  const tasks: Task[] = [];
  let left = existing.length;
  for (const b of blockIds) {
    const len = ctx.blocks[b].length;
    if (left >= len) left -= len;
    else {
      tasks.push({ block: b, skip: left });
      left = 0;
    }
  }

  const progress = new Progress(total, existing.length);
  let written = existing.length;
  let signal: NodeJS.Signals | undefined;
  const onSignal = (s: NodeJS.Signals) => {
    signal ??= s;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  const interruptAt = interruptHook();
  const hooks = {
    onRow(row: Parameters<typeof rowText>[2]) {
      sink.write(rowText(ctx, header, row));
      written++;
      tally.set(row.status, (tally.get(row.status) ?? 0) + 1);
      progress.tick();
      if (interruptAt && written === interruptAt.rows) process.kill(process.pid, interruptAt.signal);
    },
    stopped: () => signal !== undefined || !sink.open,
  };
  let complete: boolean;
  try {
    complete = opt.jobs > 1 && tasks.length > 1 ? await runParallel(ctx, tasks, opt.jobs, hooks) : await runSerial(ctx, tasks, hooks);
  } catch (e) {
    if (e instanceof WorkerFailure && e.workerStack) e.stack = e.workerStack;
    throw e;
  } finally {
    progress.finish();
    sink.close();
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
  const where = o.out ? ` in \`${o.out}\`` : '';
  if (!complete) {
    if (!sink.open) return EXIT.ok; // the reader of standard output went away
    await writeErr(`sweep interrupted: ${written} of ${total} points written${where}${o.out ? '; run the same command with --resume to solve the rest' : ''}`);
    return signal === 'SIGTERM' ? 143 : 130;
  }
  const failed = [...tally].filter(([s]) => s !== 'converged');
  if (failed.length) {
    await writeErr(`sweep: ${total} points${where}; ${[...tally].map(([s, n]) => `${n} ${s}`).join(', ')} (see the status and message of each row)`);
    return (tally.get('not-converged') ?? 0) > 0 ? EXIT.notConverged : (tally.get('infeasible') ?? 0) > 0 ? EXIT.infeasible : EXIT.input;
  }
  return EXIT.ok;
}
