/**
 * The output of a sweep: the header, then one line per point, each written with one write
 * call as soon as it is known (and fsync'd at least once a second and at the end), so that an
 * interrupted run leaves only whole lines, save at most a partial last one.
 *
 * Resume reads the file back: the header must match this run (same digest, same shard), the
 * rows must be the first points of this run's order; a partial last line is cut off. The run
 * then appends the missing points.
 */
import { closeSync, existsSync, fsyncSync, openSync, readFileSync, statSync, truncateSync, writeSync } from 'node:fs';
import { InputError } from '../diagnostics.js';
import { headerLines, parseHeader, parseRow, type SweepHeader } from './records.js';

export interface ExistingRow {
  point: number;
  status: string;
}

export interface SinkOptions {
  /** undefined: standard output. */
  path?: string;
  resume: boolean;
  overwrite: boolean;
}

const FSYNC_INTERVAL_MS = 1000;

function refuse(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}

export class SweepSink {
  private fd: number | undefined;
  private lastSync = Date.now();
  private broken = false;
  /** A regular file is synced to disk; a device or a pipe (`--out /dev/stdout`) cannot be. */
  private readonly sync: boolean;

  private constructor(readonly path: string | undefined, fd: number | undefined, sync = true) {
    this.fd = fd;
    this.sync = sync;
    if (path === undefined) {
      process.stdout.on('error', () => {
        // The reader went away (e.g. `| head`): stop writing.
        this.broken = true;
      });
    }
  }

  /** false once standard output is closed by its reader. */
  get open(): boolean {
    return !this.broken;
  }

  /**
   * Opens the output. With `resume`, returns the rows already there (checked against `order`,
   * this run's points in the order they are written).
   */
  static open(o: SinkOptions, header: SweepHeader, headerText: string, order: Int32Array): { sink: SweepSink; existing: ExistingRow[] } {
    try {
      return SweepSink.openOrThrow(o, header, headerText, order);
    } catch (e) {
      // A folder that does not exist, a folder given as the file, no permission: the user's to fix.
      const code = (e as NodeJS.ErrnoException).code;
      if (e instanceof InputError || !code || o.path === undefined) throw e;
      const why = code === 'ENOENT' ? 'its folder does not exist' : code === 'EACCES' || code === 'EPERM' ? 'permission denied' : code === 'EISDIR' ? 'it is a folder' : code;
      throw refuse(`--out: cannot write ${o.path}: ${why}`, 'give the path of a file in an existing folder that you may write to');
    }
  }

  private static openOrThrow(o: SinkOptions, header: SweepHeader, headerText: string, order: Int32Array): { sink: SweepSink; existing: ExistingRow[] } {
    if (o.path === undefined) {
      if (o.resume) throw refuse('--resume needs --out FILE', 'a sweep written to the terminal or a pipe cannot be resumed; write it to a file with --out');
      process.stdout.write(headerText);
      return { sink: new SweepSink(undefined, undefined), existing: [] };
    }
    const path = o.path;
    if (existsSync(path) && !statSync(path).isFile()) {
      // A terminal, a pipe or /dev/stdout: written straight, never synced, never resumed.
      if (o.resume) throw refuse(`--resume: \`${path}\` is not a regular file`, 'a sweep written to a device or a pipe cannot be resumed; write it to a file');
      const fd = openSync(path, 'w');
      writeSync(fd, headerText);
      return { sink: new SweepSink(path, fd, false), existing: [] };
    }
    if (o.resume && existsSync(path) && statSync(path).size > 0) {
      const existing = readExisting(path, header, headerText, order);
      if (existing) {
        const fd = openSync(path, 'a');
        return { sink: new SweepSink(path, fd), existing };
      }
      // The header itself was cut short (it is a beginning of this run's header): nothing was
      // written yet; start afresh.
    } else if (!o.resume && !o.overwrite && existsSync(path) && statSync(path).size > 0) {
      throw refuse(`\`${path}\` exists`, 'add --resume to continue the sweep it holds, or --overwrite to start it again');
    }
    const fd = openSync(path, 'w');
    writeSync(fd, headerText);
    fsyncSync(fd);
    return { sink: new SweepSink(path, fd), existing: [] };
  }

  /** Writes one line (a newline is added). */
  write(line: string): void {
    if (this.fd === undefined) {
      if (!this.broken) process.stdout.write(`${line}\n`);
      return;
    }
    writeSync(this.fd, `${line}\n`);
    if (!this.sync) return;
    const now = Date.now();
    if (now - this.lastSync >= FSYNC_INTERVAL_MS) {
      fsyncSync(this.fd);
      this.lastSync = now;
    }
  }

  close(): void {
    if (this.fd === undefined) return;
    if (this.sync) fsyncSync(this.fd);
    closeSync(this.fd);
    this.fd = undefined;
  }
}

/** The rows of an interrupted run, or undefined when not even the header is complete. */
function readExisting(path: string, header: SweepHeader, headerText: string, order: Int32Array): ExistingRow[] | undefined {
  const buf = readFileSync(path);
  // The file's own format decides how long its header is (a CSV output resumed with --jsonl is
  // told apart from a file that is not an output at all).
  const need = headerLines(buf[0] === 0x7b ? 'jsonl' : buf[0] === 0x23 ? 'csv' : header.format);
  let headEnd = 0;
  for (let k = 0; k < need; k++) {
    const nl = buf.indexOf(0x0a, headEnd);
    if (nl < 0) {
      if (Buffer.from(headerText, 'utf8').subarray(0, buf.length).equals(buf)) return undefined;
      throw refuse(`\`${path}\` is not a sweep output of loopclose (it does not begin with a sweep header)`, 'give another --out, or --overwrite to replace it');
    }
    headEnd = nl + 1;
  }
  const headText = buf.subarray(0, headEnd).toString('utf8').split('\n').slice(0, need);
  const old = parseHeader(headText);
  if (!old) throw refuse(`\`${path}\` is not a sweep output of loopclose (its first line is not a sweep header)`, 'give another --out, or --overwrite to replace it');
  checkHeader(path, old, header);
  // Whole lines only: a partial last line (the run was killed while writing it) is cut off.
  const lastNl = buf.lastIndexOf(0x0a);
  const complete = lastNl + 1;
  if (complete < buf.length) truncateSync(path, complete);
  const body = buf.subarray(headEnd, complete).toString('utf8');
  const lines = body === '' ? [] : body.slice(0, -1).split('\n');
  if (lines.length > order.length) {
    throw refuse(`\`${path}\` holds ${lines.length} rows, more than the ${order.length} points of this ${header.shard === '1/1' ? 'sweep' : `shard (${header.shard})`}`, 'it was edited or joined with another file; start again with --overwrite');
  }
  const rows: ExistingRow[] = [];
  lines.forEach((line, k) => {
    const r = parseRow(old.format, line, old.inputs.length);
    if (!r || r.point !== order[k]) {
      throw refuse(`\`${path}\` line ${need + k + 1}: expected the row of point ${order[k]}, found ${r ? `point ${r.point}` : 'no row'}`,
        'the file was edited or written by another run; start again with --overwrite');
    }
    rows.push(r);
  });
  return rows;
}

function checkHeader(path: string, old: SweepHeader, now: SweepHeader): void {
  if (old.format !== now.format) {
    throw refuse(`\`${path}\` was written as ${old.format === 'jsonl' ? 'JSON Lines' : 'CSV'}`, old.format === 'jsonl' ? 'add --jsonl to resume it' : 'drop --jsonl to resume it');
  }
  if (old.flowsheet !== now.flowsheet) {
    throw refuse(`the flowsheet file has changed since \`${path}\` was started (its digest was ${old.flowsheet.slice(0, 12)}, it is now ${now.flowsheet.slice(0, 12)}); --resume would mix results of two different files`,
      'restore the file as it was, or start the sweep again with --overwrite');
  }
  if (old.digest !== now.digest && old.command === now.command) {
    // The same command and flowsheet, other results: a file the command reads (a historian export
    // given to --readings) has changed since.
    throw refuse(`a file the command reads has changed since \`${path}\` was started (the command and the flowsheet are the same: ${now.command}); --resume would mix results of two different inputs`,
      'restore the file as it was (for a reconciliation: the --readings export), or start again with --overwrite');
  }
  if (old.digest !== now.digest) {
    throw refuse(`the command differs from the one that started \`${path}\`:\n    was: ${old.command}\n    now: ${now.command}`,
      'run the first command again with --resume, or start again with --overwrite');
  }
  if (old.shard !== now.shard) {
    throw refuse(`\`${path}\` holds shard ${old.shard}, not ${now.shard}`, `resume it with --shard ${old.shard}, or give this shard its own --out`);
  }
}
