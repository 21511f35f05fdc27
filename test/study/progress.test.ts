import { describe, expect, it } from 'vitest';
import { Progress, progressLine } from '../../src/study/progress.js';

function stream(isTTY: boolean) {
  const out: string[] = [];
  return { out, s: { isTTY, columns: 80, write: (t: string) => (out.push(t), true) } };
}

describe('sweep progress line', () => {
  it('shows points done, the rate and the time left', () => {
    const line = progressLine(250, 1000, 250, 2, 80);
    expect(line).toMatch(/^\[#+-+\]  250\/1000  25 %  125 points\/s  0:06 left$/);
    expect(line.length).toBeLessThan(80);
    // Resumed: the rate counts only the points solved in this run.
    expect(progressLine(600, 1000, 100, 4, 80)).toMatch(/25 points\/s  0:16 left/);
  });

  it('draws on a terminal and stays silent otherwise', () => {
    const tty = stream(true);
    const p = new Progress(3, 0, tty.s);
    p.tick();
    p.tick();
    p.tick();
    p.finish();
    expect(tty.out.length).toBeGreaterThanOrEqual(2);
    expect(tty.out.some((t) => t.includes('3/3'))).toBe(true);
    expect(tty.out[tty.out.length - 1]).toBe('\r\x1b[K');
    const pipe = stream(false);
    const q = new Progress(3, 0, pipe.s);
    q.tick();
    q.finish();
    expect(pipe.out).toEqual([]);
  });
});
