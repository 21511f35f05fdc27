/**
 * `loopclose reconcile --readings F.csv --jobs N`: blocks of rows on worker threads write the
 * bytes of the serial run (CSV and JSON Lines, and after a resume). The rows are taken from the
 * demo's year where it has a frozen purge meter (day 90) and the makeup meter reading high
 * (from day 200), so that row problems and serial elimination are part of what is compared.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cli, tempFile } from '../helpers/cli.js';

const DEMO = 'flowsheets/ammonia-loop.yaml';

function slices(): string {
  const lines = readFileSync('flowsheets/data/ammonia-loop-year.csv', 'utf8').split('\n');
  const at = lines.findIndex((l) => l.startsWith('timestamp'));
  const head = lines.slice(at, at + 2);
  const rows = lines.slice(at + 2).filter((l) => l.trim() !== '');
  const day = (d: number) => rows.findIndex((l) => l.startsWith(new Date(Date.UTC(2024, 0, 1) + d * 86400e3).toISOString().slice(0, 10)));
  return [...head, ...rows.slice(day(90), day(90) + 18), ...rows.slice(day(200), day(200) + 12)].join('\n') + '\n';
}

describe('loopclose reconcile --jobs', () => {
  const csv = tempFile('rows.csv', slices());
  const run = (extra: string[]) => {
    const out = tempFile('out', '');
    const r = cli(['reconcile', DEMO, '--readings', csv, '--block', '7', '--out', out, '--overwrite', ...extra]);
    expect(r.code, r.stderr).toBe(0);
    return readFileSync(out, 'utf8');
  };

  it('writes on worker threads the same bytes as a serial run (CSV, JSON Lines)', () => {
    const serial = run([]);
    const lines = serial.trim().split('\n').slice(4);
    expect(lines.length).toBe(30);
    // What is compared holds a frozen meter said in its row and rows with a suspect named.
    expect(lines.some((l) => /FI-205: left out: frozen|FI-205[^,]*frozen/.test(l))).toBe(true);
    expect(lines.filter((l) => l.split(',')[2] === 'gross-error').length).toBeGreaterThan(5);
    expect(run(['--jobs', '2'])).toBe(serial);
    expect(run(['--jobs', '3'])).toBe(serial);
    expect(run(['--jsonl', '--jobs', '2'])).toBe(run(['--jsonl']));
  });

  it('resumes with --jobs 2 to the bytes of an uninterrupted run', () => {
    const whole = run([]);
    const lines = whole.split('\n');
    const part = tempFile('part.csv', `${lines.slice(0, 4 + 9).join('\n')}\n${lines[13].slice(0, 20)}`);
    const r = cli(['reconcile', DEMO, '--readings', csv, '--block', '7', '--out', part, '--resume', '--jobs', '2']);
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(part, 'utf8')).toBe(whole);
  });

  it('refuses a --jobs that is not a whole number >= 1, and --jobs without --readings', () => {
    const bad = cli(['reconcile', DEMO, '--readings', csv, '--jobs', '0']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--jobs must be a whole number >= 1, not `0`/);
    const alone = cli(['reconcile', DEMO, '--jobs', '2']);
    expect(alone.code).toBe(2);
    expect(alone.stderr).toMatch(/--jobs go with --readings/);
  });
});
