/** Output helpers: files are written to a temporary name and renamed, never left half-written. */
import { closeSync, fsyncSync, openSync, renameSync, unlinkSync, writeSync } from 'node:fs';
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
