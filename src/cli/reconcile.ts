/**
 * `loopclose reconcile FILE [--readings F.csv] [--json | --csv | --jsonl]`: do the plant's own
 * meters close the balance? One snapshot (the file's `readings:`), or one row per timestamp of a
 * historian export (resumable, with a progress line on a terminal). See src/plant/plant.ts.
 */
import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import { InputError } from '../diagnostics.js';
import { loadFlowsheet, readFlowsheetFile } from '../flowsheet/validate.js';
import { Progress } from '../study/progress.js';
import { parseHeader, type SweepHeader } from '../study/records.js';
import { SweepSink } from '../study/sink.js';
import { DEFAULT_FROZEN } from '../plant/historian.js';
import { csvLine } from '../report/format.js';
import { plantJson, plantText, rowColumns, rowCsv } from '../plant/output.js';
import { preparePlant, type PlantReport, type RowReading } from '../plant/plant.js';
import { DEFAULT_ROW_BLOCK, plantWorkerFile, prepareRows, rowBlocks, rowsHeader, type RowOut, type RowsSpec } from '../plant/rows.js';
import { runBlocksParallel, runBlocksSerial, WorkerFailure, type Task } from '../study/runner.js';
import { EXIT } from './exit.js';
import { writeErr } from './io.js';

/** Rows written to the output with one call, at most (and at most CHUNK_MS apart). */
const ROW_CHUNK = 64;
const CHUNK_MS = 250;

export interface ReconcileCliOptions {
  readings?: string;
  json?: boolean;
  csv?: boolean;
  jsonl?: boolean;
  out?: string;
  resume?: boolean;
  overwrite?: boolean;
  block?: string;
  frozen?: string;
  flowUnit?: string;
  jobs?: string;
}

/** Exit code of a snapshot's status: answered (0), not converged (3), invalid (2). */
export function reconcileExit(status: PlantReport['status'] | string): number {
  return status === 'not-converged' ? EXIT.notConverged : status === 'invalid' ? EXIT.input : EXIT.ok;
}

export function registerReconcile(program: Command, setCode: (code: number) => void, emit: (text: string, out?: string) => Promise<void>): void {
  program
    .command('reconcile')
    .description("plant data: raw closure of the file's readings, reconciliation under the balances, gross-error tests and fitted figures; one snapshot, or one row per timestamp of a historian export")
    .argument('<file>', 'flowsheet file with `instruments:` (and `readings:` for one snapshot)')
    .option('--readings <csv>', 'historian export: a timestamp column, then one column per tag (AI-205.H2 for an analyzer); one output row per timestamp')
    .option('--json', 'one snapshot as JSON, SI units')
    .option('--csv', 'CSV: one row per snapshot')
    .option('--jsonl', 'JSON Lines: one object per row (with --readings)')
    .option('--out <file>', 'write to a file (needed for --resume)')
    .option('--resume', 'continue an interrupted run in --out: only the missing rows are reconciled')
    .option('--overwrite', 'start again when --out exists')
    .option('--block <n>', `rows solved in a row from one cold start (default ${DEFAULT_ROW_BLOCK})`)
    .option('--jobs <n>', 'threads reconciling blocks of rows (with --readings; the output is the same as with one)')
    .option('--frozen <n>', `a reading equal to itself for n rows running is left out as frozen (default ${DEFAULT_FROZEN}; 0: never)`)
    .option('--flow-unit <unit>', 'display unit of molar flows in the text report, e.g. kmol/h')
    .action(async (file: string, o: ReconcileCliOptions) => {
      const problems: string[] = [];
      const formats = [o.json, o.csv, o.jsonl].filter(Boolean).length;
      if (formats > 1) problems.push('give one of --json, --csv and --jsonl');
      if (o.jsonl && !o.readings) problems.push('--jsonl writes one object per row of --readings; for one snapshot use --json');
      if (o.json && o.readings) problems.push('--json prints one snapshot; with --readings use --jsonl (or --csv)');
      if ((o.resume || o.block || o.jobs) && !o.readings) problems.push('--resume, --block and --jobs go with --readings');
      if (o.resume && !o.out) problems.push('--resume needs --out FILE (the output to continue)');
      if (o.resume && o.overwrite) problems.push('give --resume or --overwrite, not both');
      const whole = (name: string, v: string | undefined, dflt: number, min: number) => {
        if (v === undefined) return dflt;
        if (!/^\s*\d+\s*$/.test(v) || Number(v) < min) {
          problems.push(`${name} must be a whole number >= ${min}, not \`${v}\``);
          return dflt;
        }
        return Number(v);
      };
      const block = whole('--block', o.block, DEFAULT_ROW_BLOCK, 1);
      const frozen = whole('--frozen', o.frozen, DEFAULT_FROZEN, 0);
      // One row is no run: every reading would be frozen (frozenTags takes n < 2 as never).
      if (frozen === 1) problems.push('--frozen 1 would leave out every reading: give 2 or more rows, or 0 for never');
      const jobs = whole('--jobs', o.jobs, 1, 1);
      if (problems.length) throw new InputError(problems.map((message) => ({ severity: 'error' as const, message })));
      if (!o.readings) {
        const { model } = loadFlowsheet(file);
        if (model.instruments.length === 0) {
          throw new InputError([{ severity: 'error', message: `${file} declares no instruments`, help: 'add `instruments:` (tag: { stream, kind, uncertainty }) and their `readings:`, or give --readings FILE.csv' }]);
        }
        if (model.readings.size === 0) {
          throw new InputError([{ severity: 'error', message: `${file} has no \`readings:\``, help: 'add a snapshot under `readings:` (tag: value with its unit), or give --readings FILE.csv' }]);
        }
        const plant = preparePlant(model);
        const readings = new Map<string, RowReading>();
        for (const [tag, r] of model.readings) readings.set(tag, { value: r.value, fractions: r.fractions, reference: r.reference });
        const { report } = plant.run({ readings });
        const cols = rowColumns(plant);
        const text = o.json ? plantJson(report, model) : o.csv ? `${csvLine(cols.names)}\n${rowCsv(cols, 1, '', report, report.status, [])}` : plantText(report, model, { flowUnit: o.flowUnit });
        await emit(text, o.out);
        setCode(reconcileExit(report.status));
        return;
      }
      setCode(await runRows(file, o, block, frozen, jobs));
    });
}

async function runRows(file: string, o: ReconcileCliOptions, block: number, frozen: number, jobs: number): Promise<number> {
  let readingsText: string;
  try {
    readingsText = readFileSync(o.readings!, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError([{ severity: 'error', message: `cannot read ${o.readings}${code === 'ENOENT' ? ': no such file' : code ? ` (${code})` : ''}`, help: 'check the path of --readings' }]);
  }
  const spec: RowsSpec = { file, text: readFlowsheetFile(file), readingsFile: o.readings!, readingsText, block, frozen, format: o.jsonl ? 'jsonl' : 'csv' };
  const ctx = prepareRows(spec);
  if (ctx.model.instruments.length === 0) throw new InputError([{ severity: 'error', message: `${file} declares no instruments`, help: 'add `instruments:` with a tag for each column of the export' }]);
  if (ctx.historian.ignored.length) await writeErr(`reconcile: columns of other tags ignored: ${ctx.historian.ignored.join(', ')}`);
  const head = rowsHeader(ctx);
  const header = parseHeader(head.text.split('\n')) as SweepHeader;
  const total = ctx.historian.rows.length;
  const order = Int32Array.from({ length: total }, (_, k) => k + 1);
  const { sink, existing } = SweepSink.open({ path: o.out, resume: !!o.resume, overwrite: !!o.overwrite }, header, head.text, order);
  const tally = new Map<string, number>();
  for (const r of existing) tally.set(r.status, (tally.get(r.status) ?? 0) + 1);
  const progress = new Progress(total, existing.length);
  let signal: NodeJS.Signals | undefined;
  const onSignal = (s: NodeJS.Signals) => {
    signal ??= s;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  let written = existing.length;
  // The blocks left: whole ones after the rows already written, the first of them cut short.
  const tasks: Task[] = [];
  let left = existing.length;
  for (let b = 0; b < ctx.blocks.length; b++) {
    const len = ctx.blocks[b].length;
    if (left >= len) left -= len;
    else {
      tasks.push({ block: b, skip: left });
      left = 0;
    }
  }
  // Rows go to the sink in chunks of whole lines (one write call for up to ROW_CHUNK rows or
  // CHUNK_MS of work), not one call per row: an interrupted run loses at most the rows of the
  // chunk not yet written, which --resume reconciles again (a row is only counted once written).
  let chunk = '';
  let chunkRows = 0;
  const chunkStatus: string[] = [];
  let chunkSince = Date.now();
  const flush = () => {
    if (chunkRows === 0) return;
    sink.write(chunk);
    written += chunkRows;
    for (const s of chunkStatus) tally.set(s, (tally.get(s) ?? 0) + 1);
    progress.tick(chunkRows);
    chunk = '';
    chunkRows = 0;
    chunkStatus.length = 0;
    chunkSince = Date.now();
  };
  const hooks = {
    onRow(row: RowOut) {
      chunk = chunkRows === 0 ? row.line : `${chunk}\n${row.line}`;
      chunkRows++;
      chunkStatus.push(row.status);
      if (chunkRows >= ROW_CHUNK || Date.now() - chunkSince >= CHUNK_MS) flush();
    },
    stopped: () => signal !== undefined || !sink.open,
  };
  let complete: boolean;
  try {
    const blocks = rowBlocks(ctx);
    complete = jobs > 1 && tasks.length > 1 ? await runBlocksParallel(blocks, tasks, jobs, hooks, plantWorkerFile()) : await runBlocksSerial(blocks, tasks, hooks);
  } catch (e) {
    if (e instanceof WorkerFailure && e.workerStack) e.stack = e.workerStack;
    throw e;
  } finally {
    flush();
    progress.finish();
    sink.close();
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
  const where = o.out ? ` in \`${o.out}\`` : '';
  if (!complete) {
    if (!sink.open) return EXIT.ok;
    await writeErr(`reconcile interrupted: ${written} of ${total} rows written${where}${o.out ? '; run the same command with --resume to reconcile the rest' : ''}`);
    return signal === 'SIGTERM' ? 143 : 130;
  }
  await writeErr(`reconcile: ${total} rows${where}; ${[...tally].map(([s, n]) => `${n} ${s}`).join(', ')}`);
  if ((tally.get('not-converged') ?? 0) > 0) return EXIT.notConverged;
  if ((tally.get('invalid') ?? 0) > 0) return EXIT.input;
  return EXIT.ok;
}
