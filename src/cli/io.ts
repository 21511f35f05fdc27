/** Output helpers: files are written to a temporary name and renamed, never left half-written. */
import { closeSync, fsyncSync, openSync, renameSync, statSync, unlinkSync, writeFileSync, writeSync } from 'node:fs';
import { InputError } from '../diagnostics.js';
import { basename, dirname, join } from 'node:path';

export function writeFileAtomic(path: string, text: string): void {
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
  let fd: number | undefined;
  try {
    fd = openSync(tmp, 'w');
    writeSync(fd, text);
    fsyncSync(fd);
    closeSync(fd);
    fd = undefined;
    renameSync(tmp, path);
  } catch (e) {
    if (fd !== undefined) closeSync(fd);
    try {
      unlinkSync(tmp);
    } catch {
      /* nothing to remove */
    }
    throw e;
  }
}

/** Writes to stdout and resolves once it is flushed (so exit codes do not cut output). */
export function writeOut(text: string): Promise<void> {
  return new Promise((resolve) => {
    if (text === '') return resolve();
    process.stdout.write(text.endsWith('\n') ? text : `${text}\n`, () => resolve());
  });
}

export function writeErr(text: string): Promise<void> {
  return new Promise((resolve) => {
    process.stderr.write(text.endsWith('\n') ? text : `${text}\n`, () => resolve());
  });
}

/**
 * Whether --out names standard output itself (`-`, /dev/stdout, /dev/fd/1): written through the
 * process's own stream, which works whatever it is connected to (a pipe, a socket, a terminal).
 */
export function isStandardOutput(path: string): boolean {
  return path === '-' || path === '/dev/stdout' || path === '/dev/fd/1' || path === '/proc/self/fd/1';
}

/** Whether a path names something other than a regular file (a terminal, a pipe, /dev/stdout). */
export function isDevice(path: string): boolean {
  try {
    return !statSync(path).isFile();
  } catch {
    return false;
  }
}

/**
 * Writes a command's whole output to --out: a regular file through a temporary name (never half
 * written), refused when it exists and holds something unless `overwrite`; a device or a pipe
 * (`--out /dev/stdout`) written straight, without renaming or syncing.
 */
export function writeOutput(path: string, text: string, opts: { overwrite?: boolean } = {}): void {
  try {
    if (isDevice(path)) {
      writeFileSync(path, text);
      return;
    }
    let exists = false;
    try {
      exists = statSync(path).size > 0;
    } catch {
      /* a new file */
    }
    if (exists && !opts.overwrite) {
      throw new InputError([{ severity: 'error', message: `--out: \`${path}\` exists`, help: 'give another file, or add --overwrite to replace it' }]);
    }
    writeFileAtomic(path, text);
  } catch (e) {
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (!code) throw e;
    const why = code === 'ENOENT' ? 'its folder does not exist' : code === 'EACCES' || code === 'EPERM' ? 'permission denied' : code === 'EISDIR' ? 'it is a folder' : code;
    throw new InputError([{ severity: 'error', message: `--out: cannot write ${path}: ${why}`, help: 'give the path of a file in an existing folder that you may write to' }]);
  }
}
