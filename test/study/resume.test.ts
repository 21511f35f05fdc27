import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { BIN, cli, ROOT, tempFile } from '../helpers/cli.js';

const PILOT = join(ROOT, 'flowsheets', 'methanol-pilot.yaml');
const REPORT = ['--report', 'streams.purge.flows.H2[kmol/h],streams.recycle.fractions.N2,loop.recycle-ratio'];

function lines(path: string): string[] {
  return readFileSync(path, 'utf8').split('\n');
}

/**
 * Runs the sweep as a child that stops itself with `sig` once `rows` rows are written (the
 * LOOPCLOSE_INTERRUPT_AFTER hook): the same point on a fast machine and on a loaded one.
 */
function killAfter(args: string[], rows: number, sig: NodeJS.Signals = 'SIGKILL'): Promise<{ code: number | null; signal: NodeJS.Signals | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [BIN, ...args], { cwd: ROOT, stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, LOOPCLOSE_INTERRUPT_AFTER: `${rows}:${sig}` } });
    let stderr = '';
    child.stderr!.on('data', (d) => (stderr += String(d)));
    child.on('close', (code, signal) => resolve({ code, signal, stderr }));
  });
}

describe('loopclose sweep --resume', () => {
  it('after kill -9 mid-sweep, solves only the missing points and gives the same file as an uninterrupted run', async () => {
    const dir = dirname(tempFile('x', ''));
    const args = (out: string) => ['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.15:0.35:240', ...REPORT, '--block', '40', '--out', out];
    const full = join(dir, 'full.csv');
    expect(cli(args(full)).code).toBe(0);
    const killed = join(dir, 'killed.csv');
    const k = await killAfter(args(killed), 100);
    expect(k.signal).toBe('SIGKILL');
    const partial = lines(killed);
    const rowsBefore = partial.length - 1 - 4;
    expect(rowsBefore).toBe(100);
    const r = cli([...args(killed), '--resume']);
    expect(r.code).toBe(0);
    expect(readFileSync(killed, 'utf8')).toBe(readFileSync(full, 'utf8'));
    // Each point once, in walk order.
    const points = lines(killed).slice(4, -1).map((l) => Number(l.split(',')[0]));
    expect(points).toEqual(Array.from({ length: 240 }, (_, k) => k + 1));
  });

  it('stops cleanly on Ctrl-C (SIGINT): whole lines only, exit 130, and --resume finishes it', async () => {
    const dir = dirname(tempFile('x', ''));
    const args = (out: string) => ['sweep', PILOT, '--jsonl', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:200', ...REPORT, '--out', out];
    const full = join(dir, 'full.jsonl');
    expect(cli(args(full)).code).toBe(0);
    const out = join(dir, 'stopped.jsonl');
    const r = await killAfter(args(out), 60, 'SIGINT');
    expect(r.code).toBe(130);
    expect(r.stderr).toMatch(/sweep interrupted: \d+ of 200 points written .*run the same command with --resume/);
    const text = readFileSync(out, 'utf8');
    expect(text.endsWith('\n')).toBe(true);
    const rows = text.split('\n').slice(1, -1);
    expect(rows.length).toBeLessThan(200);
    for (const l of rows) expect(JSON.parse(l).status).toBe('converged');
    expect(cli([...args(out), '--resume']).code).toBe(0);
    expect(readFileSync(out, 'utf8')).toBe(readFileSync(full, 'utf8'));
  });

  it('cuts off a truncated last line and finishes a block begun before the interruption (also on 2 worker threads)', () => {
    const dir = dirname(tempFile('x', ''));
    const args = (out: string) => ['sweep', PILOT, '--jsonl', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:30', ...REPORT, '--block', '10', '--out', out];
    const full = join(dir, 'full.jsonl');
    expect(cli(args(full)).code).toBe(0);
    const all = lines(full);
    expect(all.length).toBe(1 + 30 + 1);
    // Header and 13 rows whole, then half of the 14th (inside the second block).
    const cut = join(dir, 'cut.jsonl');
    writeFileSync(cut, `${all.slice(0, 14).join('\n')}\n${all[14].slice(0, 40)}`);
    expect(cli([...args(cut), '--resume']).code).toBe(0);
    expect(readFileSync(cut, 'utf8')).toBe(readFileSync(full, 'utf8'));
    const cut2 = join(dir, 'cut2.jsonl');
    writeFileSync(cut2, `${all.slice(0, 6).join('\n')}\n${all[6].slice(0, 7)}`);
    expect(cli([...args(cut2), '--resume', '--jobs', '2']).code).toBe(0);
    expect(readFileSync(cut2, 'utf8')).toBe(readFileSync(full, 'utf8'));
    // A complete file: nothing to do, nothing changed.
    const whole = readFileSync(full, 'utf8');
    expect(cli([...args(full), '--resume']).code).toBe(0);
    expect(readFileSync(full, 'utf8')).toBe(whole);
  });

  it('refuses to resume when the flowsheet file or the command changed, and leaves the output as it was', () => {
    const dir = dirname(tempFile('x', ''));
    const sheet = join(dir, 'pilot.yaml');
    copyFileSync(PILOT, sheet);
    const grid = ['--grid', 'reactor.reactions.0.conversion=0.15:0.35:12'];
    const out = join(dir, 'out.csv');
    expect(cli(['sweep', sheet, ...grid, ...REPORT, '--out', out]).code).toBe(0);
    const text = lines(out);
    writeFileSync(out, `${text.slice(0, 4 + 5).join('\n')}\n`);
    const kept = readFileSync(out, 'utf8');
    const cmd = cli(['sweep', sheet, '--grid', 'reactor.reactions.0.conversion=0.15:0.35:13', ...REPORT, '--out', out, '--resume']);
    expect(cmd.code).toBe(2);
    expect(cmd.stderr).toMatch(/the command differs from the one that started/);
    expect(cmd.stderr).toMatch(/was: loopclose sweep .*0\.15:0\.35:12/);
    writeFileSync(sheet, `${readFileSync(sheet, 'utf8')}\n# edited after the sweep began\n`);
    const file = cli(['sweep', sheet, ...grid, ...REPORT, '--out', out, '--resume']);
    expect(file.code).toBe(2);
    expect(file.stderr).toMatch(/the flowsheet file has changed since/);
    expect(file.stderr).toMatch(/--overwrite/);
    expect(readFileSync(out, 'utf8')).toBe(kept);
    const shard = cli(['sweep', PILOT, ...grid, ...REPORT, '--out', out, '--resume', '--jsonl']);
    expect(shard.code).toBe(2);
    expect(shard.stderr).toMatch(/was written as CSV/);
  });
});
