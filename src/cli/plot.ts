/**
 * `loopclose plot FILE --x PATH --y PATH[,PATH] [--series PATH | --heatmap] [--out plot.html|plot.svg]`:
 * plots of a sweep output (CSV or JSON Lines) or of a reconciliation output over time.
 */
import { readFileSync } from 'node:fs';
import { extname } from 'node:path';
import { InputError, type Diagnostic } from '../diagnostics.js';
import { plotHtml, plotSvg } from '../report/plot.js';
import { readStudyTable } from '../report/study-table.js';
import { firstLine } from './report.js';

export interface PlotCliOptions {
  x?: string;
  y?: string[];
  series?: string;
  heatmap?: boolean;
  svg?: boolean;
  out?: string;
}

export async function runPlot(file: string, o: PlotCliOptions): Promise<string> {
  const problems: Diagnostic[] = [];
  if (!o.x) problems.push({ severity: 'error', message: '--x: give the path of the x axis', help: 'e.g. --x reactor.reactions.0.conversion (a sweep input) or --x timestamp' });
  const y = (o.y ?? []).flatMap((v) => v.split(',')).map((v) => v.trim()).filter((v) => v !== '');
  if (!y.length) problems.push({ severity: 'error', message: '--y: give the path of at least one column to plot', help: 'e.g. --y streams.purge.total or --y closure.N,closure.H' });
  const ext = o.out ? extname(o.out).toLowerCase() : '';
  if (o.out && ext !== '.svg' && ext !== '.html' && ext !== '.htm') problems.push({ severity: 'error', message: `--out: \`${o.out}\` ends in neither .html nor .svg`, help: 'name the output plot.html (a page) or plot.svg (the picture alone)' });
  if (o.svg && (ext === '.html' || ext === '.htm')) problems.push({ severity: 'error', message: `--svg asks for SVG, but --out \`${o.out}\` names an HTML page`, help: 'leave out --svg, or name the output plot.svg' });
  if (problems.length) throw new InputError(problems);
  firstLine(file); // a clear message when the file cannot be read
  const table = readStudyTable(readFileSync(file, 'utf8'), file);
  const opts = { x: o.x!, y, ...(o.series !== undefined ? { series: o.series } : {}), heatmap: !!o.heatmap };
  return ext === '.svg' || (!o.out && o.svg) ? plotSvg(table, opts) : plotHtml(table, opts);
}
