/**
 * Many snapshots of one plant: the rows of a historian export, each reconciled on its own.
 *
 * Rows are cut into blocks (`block` rows, default 500); the first row of a block starts from the
 * design solve's values, every later row of the block from the last row before it in the block
 * that reconciled (global test passed), or from the design when none has (a warm start: the same
 * answer to the solver's tolerance, found faster). A block is thus always solved as the
 * same sequence of solves, so a resumed run writes the same bytes as an uninterrupted one.
 * Frozen meters are found over the whole file first (they depend on the rows before).
 */
import { createHash } from 'node:crypto';
import { validateText } from '../flowsheet/validate.js';
import type { Model } from '../flowsheet/model.js';
import { frozenTags, parseHistorian, type Historian } from './historian.js';
import { rowInput } from './historian.js';
import { csvLine } from '../report/format.js';
import { rowColumns, rowCsv, rowJson, PLANT_CAUTION, type RowColumns } from './output.js';
import { preparePlant, type PlantOptions, type PlantReconciliation } from './plant.js';
import type { Blocks } from '../study/runner.js';

export const DEFAULT_ROW_BLOCK = 500;

/** Everything that decides the rows; plain data. */
export interface RowsSpec {
  file: string;
  text: string;
  readingsFile: string;
  readingsText: string;
  block: number;
  frozen: number;
  format: 'csv' | 'jsonl';
}

export interface RowsContext {
  spec: RowsSpec;
  model: Model;
  plant: PlantReconciliation;
  historian: Historian;
  frozen: ReturnType<typeof frozenTags>;
  columns: RowColumns;
  blocks: Int32Array[];
}

export interface RowOut {
  point: number;
  status: string;
  line: string;
}

export function prepareRows(spec: RowsSpec, options: PlantOptions = {}): RowsContext {
  const model = validateText(spec.file, spec.text).model;
  const historian = parseHistorian(spec.readingsText, spec.readingsFile, model, spec.frozen);
  const plant = preparePlant(model, options);
  const blocks: Int32Array[] = [];
  const N = historian.rows.length;
  for (let b = 0; b * spec.block < N; b++) {
    const len = Math.min(spec.block, N - b * spec.block);
    blocks.push(Int32Array.from({ length: len }, (_, k) => b * spec.block + k + 1));
  }
  return { spec, model, plant, historian, frozen: frozenTags(historian), columns: rowColumns(plant), blocks };
}

/** The rows of block b (points are 1-based row numbers); `skip` leading rows are solved but not yielded. */
export function* rowsOfBlock(ctx: RowsContext, b: number, skip = 0): Generator<RowOut> {
  let warm: Float64Array | undefined;
  const block = ctx.blocks[b];
  for (let w = 0; w < block.length; w++) {
    const point = block[w];
    const r = point - 1;
    const row = ctx.historian.rows[r];
    const { input, said, invalid } = rowInput(ctx.historian, ctx.model, r, ctx.frozen);
    let line: string;
    let status: string;
    if (invalid) {
      status = 'invalid';
      line = ctx.spec.format === 'csv' ? rowCsv(ctx.columns, point, row.timestamp, undefined, status, said, invalid) : rowJson(point, row.timestamp, undefined, status, said, invalid);
    } else {
      const { report, x } = ctx.plant.run(input, warm);
      status = report.status;
      // Only a row whose readings agree with the balances starts the next: the solution of a row
      // with a gross error (its suspects' flows free, perhaps at 0) or with nothing to check can
      // lead the next row's solve to another local minimum of the bilinear balances.
      if (status === 'reconciled') warm = x;
      line = ctx.spec.format === 'csv' ? rowCsv(ctx.columns, point, row.timestamp, report, status, said) : rowJson(point, row.timestamp, report, status, said);
    }
    if (w >= skip) yield { point, status, line };
  }
}

/** Blocks of rows for the runner (src/study/runner.ts): here, or in a worker prepared from the same spec. */
export function rowBlocks(ctx: RowsContext): Blocks<RowOut> {
  return { rows: (block, skip) => rowsOfBlock(ctx, block, skip), workerData: { spec: ctx.spec } };
}

/** The worker script next to the bundled CLI (dist/plant-worker.mjs). */
export function plantWorkerFile(): URL {
  return new URL('./plant-worker.mjs', import.meta.url);
}

function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

function word(s: string): string {
  return /^[A-Za-z0-9._/:=,@%+-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`;
}

/** The header (the sweep layout, kind `reconcile`, so that resume and plots read it) and its parts. */
export function rowsHeader(ctx: RowsContext): { text: string; digest: string; flowsheet: string; command: string } {
  const { spec } = ctx;
  const flowsheet = sha256(spec.text);
  const options = `--readings ${word(spec.readingsFile)} --block ${spec.block} --frozen ${spec.frozen}${spec.format === 'jsonl' ? ' --jsonl' : ''}`;
  const readings = sha256(spec.readingsText);
  const digest = sha256(`${flowsheet}\n${readings}\n${options}`);
  const command = `loopclose reconcile ${word(spec.file)} ${options}`;
  const N = ctx.historian.rows.length;
  if (spec.format === 'jsonl') {
    const outputs = ctx.columns.names.filter((n) => !['point', 'timestamp', 'status', 'message'].includes(n)).map((n) => {
      const m = /^(.*)\[([^\]]+)\]$/.exec(n);
      return m ? { path: m[1], unit: m[2] } : { path: n, unit: '1' };
    });
    const head = {
      loopclose: 'reconcile', digest, flowsheet, readings, command, points: N, shape: [N], block: spec.block, shard: '1/1',
      inputs: [{ path: 'timestamp', unit: '1' }], outputs, adjusted: [], note: PLANT_CAUTION,
    };
    return { text: `${JSON.stringify(head)}\n`, digest, flowsheet, command };
  }
  const text = [
    `# loopclose reconcile ${digest} points=${N} shape=${N} block=${spec.block} shard=1/1 flowsheet=${flowsheet}`,
    `# command: ${command}`,
    `# note: ${PLANT_CAUTION}`,
    csvLine(ctx.columns.names),
    '',
  ].join('\n');
  return { text, digest, flowsheet, command };
}
