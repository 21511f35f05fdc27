/** The loopclose command line. */
import { Command, CommanderError } from 'commander';
import { InputError, diagnosticsJson, formatDiagnostics } from '../diagnostics.js';
import { EXIT, exitCodeOf } from './exit.js';
import { isStandardOutput, writeErr, writeOut, writeOutput } from './io.js';
import { readFileSync } from 'node:fs';

const VERSION = '0.1.0';

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}

/** Colour only on a terminal, and never with NO_COLOR set (https://no-color.org). */
export function useColor(stream: NodeJS.WriteStream): boolean {
  return !!stream.isTTY && !('NO_COLOR' in process.env && process.env.NO_COLOR !== '');
}

async function reportError(e: unknown, debug: boolean, json: boolean): Promise<number> {
  if (e instanceof InputError && json) {
    await writeOut(JSON.stringify(diagnosticsJson(e.diagnostics), null, 2));
    return EXIT.input;
  }
  if (e instanceof InputError) {
    const sources = new Map<string, string>();
    for (const d of e.diagnostics) {
      const f = d.span?.file;
      if (f && !sources.has(f)) {
        try {
          sources.set(f, readFileSync(f, 'utf8'));
        } catch {
          /* the message stands without the source line */
        }
      }
    }
    const errors = e.diagnostics.filter((d) => d.severity === 'error').length;
    await writeErr(`${formatDiagnostics(e.diagnostics, sources, { color: useColor(process.stderr) })}\n\n${errors} error${errors === 1 ? '' : 's'}; nothing was computed.`);
    return EXIT.input;
  }
  const msg = e instanceof Error ? e.message : String(e);
  await writeErr(debug && e instanceof Error && e.stack ? `internal error: ${e.stack}` : `internal error: ${msg} (run again with --debug for details, and report it)`);
  return EXIT.internal;
}

async function emit(text: string, out?: string, overwrite?: boolean): Promise<void> {
  if (out && !isStandardOutput(out)) writeOutput(out, text.endsWith('\n') ? text : `${text}\n`, { overwrite });
  else await writeOut(text);
}

/**
 * Test hook: with LOOPCLOSE_FAULT=1 in the environment, every command fails with an
 * internal error before it reads its input (to test how internal errors are reported: one
 * line and a pointer to --debug, exit 1). It changes nothing else.
 */
function faultHook(): void {
  if (process.env.LOOPCLOSE_FAULT === '1') throw new Error('fault injected by LOOPCLOSE_FAULT=1 (test hook)');
}

/** Commands registered in this file (their modules load when they run). */
const CORE_COMMANDS = new Set(['meter', 'solve', 'report', 'plot']);
/** Commands whose registration lives in a module of its own, loaded by main(). */
const LOADED_COMMANDS = new Set(['sweep', 'merge', 'reconcile']);

/**
 * The command named on the line (the first word after the program that is not an option), or
 * undefined for none. The program's own options (--debug, --version, --help) take no value, so
 * the first such word is the command.
 */
export function commandName(argv: readonly string[]): string | undefined {
  for (const a of argv.slice(2)) {
    if (a === '--') return undefined;
    if (!a.startsWith('-')) return a;
  }
  return undefined;
}

export async function main(argv: string[]): Promise<void> {
  const debug = argv.includes('--debug');
  const json = argv.includes('--json');
  const commanderErrors: string[] = [];
  // A reader that goes away (`loopclose merge ... | head -1`) ends the output quietly.
  for (const stream of [process.stdout, process.stderr]) {
    stream.on('error', (err: NodeJS.ErrnoException) => {
      if (err.code === 'EPIPE') process.exit(process.exitCode ?? 0);
      throw err;
    });
  }
  let code: number = EXIT.ok;
  const program = new Command();
  program
    .name('loopclose')
    .description('Steady state of gas-phase reaction loops from one YAML file.')
    .version(VERSION)
    .option('--debug', 'show details of internal errors')
    .exitOverride()
    .configureOutput({
      writeErr: (s) => process.stderr.write(s),
      // With --json a mistake in the command line is JSON diagnostics too.
      outputError: (s, write) => (json ? commanderErrors.push(s.replace(/^error: /, '').trim()) : write(s)),
    });

  program
    .command('meter')
    .description('convert gas-meter readings to molar flows with a real-gas equation of state')
    .argument('[file]', 'flowsheet file whose feeds are converted')
    .option('--json', 'print the result as JSON in SI units')
    .option('--gas <fractions>', 'one reading: mole fractions, e.g. "H2=0.985,N2=0.015"')
    .option('--flow <quantity>', 'actual volume flow at the meter, e.g. "12.6 m3/h"')
    .option('--pressure <quantity>', 'line pressure, e.g. "30 barg"')
    .option('--temperature <quantity>', 'line temperature, e.g. "35 degC"')
    .option('--eos <name>', 'GERG-2008 (the meters only; phases and a gas it does not cover use the file\'s equation, or --fallback-eos), SRK, PR or ideal')
    .option('--fallback-eos <name>', 'one reading with --eos GERG-2008: the equation for the phase test and for a gas GERG-2008 does not cover (SRK, the default, or PR)')
    .option('--flow-uncertainty <value>', 'one reading: uncertainty of the flow reading, e.g. "1.5 %"')
    .option('--pressure-uncertainty <quantity>', 'one reading: uncertainty of the line pressure, a difference, e.g. "0.1 bar"')
    .option('--temperature-uncertainty <quantity>', 'one reading: uncertainty of the line temperature, a difference, e.g. "0.5 K"')
    .option('--uncertainty-stated-as <kind>', 'the uncertainties above are standard (default), expanded (k = 2) or limits (plus or minus, rectangular)')
    .option('--atmosphere <quantity>', 'local atmosphere for gauge readings (default 101.325 kPa)')
    .option('--flow-unit <unit>', 'display unit of molar flows')
    .option('--out <file>', 'write the report to a file')
    .option('--overwrite', 'replace --out when it exists')
    .action(async (file: string | undefined, o) => {
      faultHook();
      const { runMeter } = await import('./meter.js');
      await emit(runMeter(file, o), o.out, o.overwrite);
    });

  program
    .command('solve')
    .description('solve a flowsheet: stream table, units, loop figures and balance closure')
    .argument('<file>', 'flowsheet file')
    .option('--json', 'print the result as JSON in SI units')
    .option('--csv', 'print the stream table as CSV')
    .option('--method <name>', 'direct, wegstein, newton, anderson or auto (Wegstein, then Newton; Anderson on large tear sets)')
    .option('--flow-unit <unit>', 'display unit of molar flows, e.g. kmol/h')
    .option('--max-passes <n>', 'budget of flowsheet passes')
    .option('--tolerance <rtol>', 'relative tolerance on every tear variable (default 1e-10)')
    .option('--target <spec>', 'hold an output at a value, e.g. "streams.recycle.fractions.N2 = 0.10" (repeatable)', collect, [])
    .option('--by <input>', 'the input adjusted for the matching --target, e.g. purge-split.out.recycle', collect, [])
    .option('--within <low:high>', 'bounds of that input, e.g. 0.8:0.999 or "10:14 m3/h"', collect, [])
    .option('--out <file>', 'write the report to a file')
    .option('--overwrite', 'replace --out when it exists')
    .action(async (file: string, o) => {
      faultHook();
      const { runSolve } = await import('./solve.js');
      const { text, result } = runSolve(file, o);
      await emit(text, o.out, o.overwrite);
      if (o.csv && result.status !== 'converged') {
        // The CSV holds no stream table for a state that is not a solution: say why where a
        // person or a script will see it.
        await writeErr(`loopclose: ${result.status}: ${result.message ?? 'no solution'}`);
      }
      code = exitCodeOf(result.status);
    });

  program
    .command('report')
    .description('a self-contained HTML report: a flowsheet (solved first) with its drawing, stream table, units, loop and balance; or a sweep output with its plots. FILE is read as a sweep output when its first line is `# loopclose sweep ...` (or a JSON Lines sweep header) or its name ends in .csv or .jsonl; otherwise as a flowsheet')
    .argument('<file>', 'flowsheet file, or a sweep output (CSV or JSON Lines)')
    .option('--out <file>', 'write the report to a file, e.g. loop.html (default: standard output)')
    .option('--svg', 'write the flowsheet drawing alone, as SVG')
    .option('--flow-unit <unit>', 'display unit of molar flows, e.g. kmol/h')
    .option('--method <name>', 'direct, wegstein, newton, anderson or auto (Wegstein, then Newton; Anderson on large tear sets)')
    .option('--max-passes <n>', 'budget of flowsheet passes')
    .option('--no-date', 'leave the date out of the report (the same file then gives the same bytes)')
    .option('--overwrite', 'replace --out when it exists')
    .action(async (file: string, o) => {
      faultHook();
      const r = await (await import('./pictures.js')).report(file, o);
      if (!r.ok) throw new InputError(r.diagnostics);
      await emit(r.text, o.out, o.overwrite);
      code = r.code;
    });

  program
    .command('plot')
    .description('plot a sweep output (CSV or JSON Lines) or a reconciliation output over time: lines against one axis, one line per value of a second axis, or a heat map; failed points are gaps, marked')
    .argument('<file>', 'sweep output, or reconciliation output')
    .option('--x <path>', 'column of the x axis: an input of the sweep, or timestamp')
    .option('--y <paths>', 'columns to plot, comma-separated (one chart each; repeatable), e.g. "streams.purge.total,streams.recycle.fractions.N2"', collect, [])
    .option('--series <path>', 'second axis: one line per value (default: the other inputs of the sweep)')
    .option('--heatmap', 'a heat map over --x and --series instead of lines')
    .option('--svg', 'write SVG (also chosen by an --out name ending in .svg)')
    .option('--out <file>', 'plot.html (a page with the plot inline) or plot.svg')
    .option('--overwrite', 'replace --out when it exists')
    .action(async (file: string, o) => {
      faultHook();
      const r = await (await import('./pictures.js')).plot(file, o);
      if (!r.ok) throw new InputError(r.diagnostics);
      await emit(r.text, o.out, o.overwrite);
    });

  // sweep, merge and reconcile bring their own modules (the study and plant layers): each is
  // loaded only when it is the command that runs, or when every command must be known (help, a
  // misspelled command). Their order in `loopclose help` stays: sweep, merge, reconcile.
  const name = commandName(argv);
  const setCode = (c: number) => {
    code = c;
  };
  const versionOnly = name === undefined && argv.slice(2).some((a) => a === '--version' || a === '-V');
  if (!versionOnly && (name === undefined || !CORE_COMMANDS.has(name))) {
    const all = name === undefined || !LOADED_COMMANDS.has(name);
    const [sweep, merge, reconcile] = await Promise.all([
      all || name === 'sweep' ? import('./sweep.js') : undefined,
      all || name === 'merge' ? import('./merge.js') : undefined,
      all || name === 'reconcile' ? import('./reconcile.js') : undefined,
    ]);
    sweep?.registerSweep(program, setCode);
    merge?.registerMerge(program, setCode);
    reconcile?.registerReconcile(program, setCode, emit);
  }

  try {
    await program.parseAsync(argv);
  } catch (e) {
    if (e instanceof CommanderError) {
      code = e.exitCode === 0 ? EXIT.ok : EXIT.input;
      if (json && commanderErrors.length) {
        await writeOut(JSON.stringify(diagnosticsJson(commanderErrors.map((message) => ({ severity: 'error' as const, message, help: 'see `loopclose help` for the options of each command' }))), null, 2));
      }
    } else {
      code = await reportError(e, debug, json);
    }
  }
  process.exitCode = code;
}
