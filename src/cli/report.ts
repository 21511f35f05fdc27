/**
 * `loopclose report FILE`: an HTML report (or, with --svg, the drawing alone) of a flowsheet,
 * solved first; or, for a sweep output, the plots of that study. A file is read as a study
 * output when its first line is a study header (`# loopclose sweep ...`, `# loopclose
 * reconcile ...`, or the JSON Lines header object) or its name ends in .csv or .jsonl.
 * main.ts loads this file through pictures.ts with import(), so `solve` and `meter` never load it.
 */
import { closeSync, openSync, readFileSync, readSync } from 'node:fs';
import { extname } from 'node:path';
import { InputError } from '../diagnostics.js';
import { reportInputOf } from '../report/html/adapter.js';
import { reportHtml, reportSvg } from '../report/html/page.js';
import { studyReportHtml } from '../report/plot.js';
import { readStudyTable, studyKindOf } from '../report/study-table.js';
import { exitCodeOf, EXIT } from './exit.js';
import { runSolve } from './solve.js';

export interface ReportCliOptions {
  out?: string;
  svg?: boolean;
  flowUnit?: string;
  method?: string;
  maxPasses?: string;
  /** false with --no-date. */
  date?: boolean;
}

/** The first line of a file (at most 4 kB read). */
export function firstLine(path: string): string {
  // A folder opens on Linux and fails only when read (EISDIR): both steps give the message.
  let fd: number | undefined;
  try {
    fd = openSync(path, 'r');
    const buf = Buffer.alloc(4096);
    const n = readSync(fd, buf, 0, buf.length, 0);
    return buf.subarray(0, n).toString('utf8').split(/\r?\n/)[0];
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (!code) throw e;
    throw new InputError([{ severity: 'error', message: `cannot read \`${path}\`${code === 'ENOENT' ? ': no such file' : code === 'EISDIR' ? ': it is a folder' : ` (${code})`}`, help: 'check the path' }]);
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/** Is this file a study output (sweep, reconciliation) rather than a flowsheet? */
export function isStudyFile(path: string): boolean {
  const ext = extname(path).toLowerCase();
  return studyKindOf(firstLine(path)) !== undefined || ext === '.csv' || ext === '.jsonl';
}

/** When the report was made: SOURCE_DATE_EPOCH (seconds) when set, else now; minutes, UTC. */
export function madeAt(): string {
  const epoch = process.env.SOURCE_DATE_EPOCH;
  const t = epoch && /^\d+$/.test(epoch) ? new Date(Number(epoch) * 1000) : new Date();
  return `${t.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

export async function runReport(file: string, o: ReportCliOptions): Promise<{ text: string; code: number }> {
  // The output's name and its contents agree, as for `plot`: an SVG drawing is not written into an
  // .html file, nor an HTML page into an .svg one.
  const ext = o.out ? extname(o.out).toLowerCase() : '';
  if (o.svg && (ext === '.html' || ext === '.htm')) throw new InputError([{ severity: 'error', message: `--svg asks for the drawing as SVG, but --out \`${o.out}\` names an HTML page`, help: 'leave out --svg for the HTML report, or name the output loop.svg' }]);
  if (!o.svg && ext === '.svg') throw new InputError([{ severity: 'error', message: `--out \`${o.out}\` names an SVG picture, but the report is an HTML page`, help: 'add --svg for the drawing alone, or name the output loop.html' }]);
  if (isStudyFile(file)) {
    if (o.svg) throw new InputError([{ severity: 'error', message: '--svg draws a flowsheet; this file is a study output', help: 'for one plot as SVG use `loopclose plot FILE --x PATH --y PATH --out plot.svg`' }]);
    // Options of a solve would be ignored: the study's numbers are drawn as the file has them.
    const unused = (['flowUnit', 'method', 'maxPasses'] as const).filter((k) => o[k] !== undefined);
    if (unused.length) {
      throw new InputError(unused.map((k) => ({ severity: 'error' as const, message: `--${k.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)} is for a flowsheet; this file is a study output`,
        help: k === 'flowUnit' ? 'the plots show the units the study wrote: give them in the sweep\'s --report (e.g. `streams.purge.total[kmol/h]`)' : 'a study output is drawn, not solved: leave the option out' })));
    }
    const table = readStudyTable(readFileSync(file, 'utf8'), file);
    return { text: await studyReportHtml(table), code: EXIT.ok };
  }
  const { result } = runSolve(file, { method: o.method, maxPasses: o.maxPasses, flowUnit: o.flowUnit });
  const input = reportInputOf(result, { flowUnit: o.flowUnit, ...(o.date === false ? {} : { generated: madeAt() }) });
  return { text: o.svg ? await reportSvg(input) : await reportHtml(input), code: exitCodeOf(result.status) };
}
