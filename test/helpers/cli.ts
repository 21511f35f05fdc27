/** Runs the built CLI (dist/, made by `npm test` before vitest) as a child process. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

export const ROOT = resolve(import.meta.dirname, '..', '..');
export const BIN = join(ROOT, 'bin', 'loopclose.js');

export interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

export function cli(args: string[], opts: { cwd?: string; input?: string } = {}): Run {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: opts.cwd ?? ROOT, encoding: 'utf8', input: opts.input, timeout: 60000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** Writes text to a new temporary file and returns its path. */
export function tempFile(name: string, text: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'loopclose-'));
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}
