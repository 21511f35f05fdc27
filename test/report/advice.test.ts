import { describe, expect, it } from 'vitest';
import { otherMethods, pct } from '../../src/report/format.js';
import { cli } from '../helpers/cli.js';

describe('what a solve that did not converge suggests', () => {
  it('names only the methods the solve did not use', () => {
    expect(otherMethods('direct')).toBe('another method (--method newton or --method wegstein), ');
    expect(otherMethods('wegstein')).toBe('another method (--method newton or --method direct), ');
    expect(otherMethods('sequential, then newton on tears and targets (final solve: wegstein)')).toBe('another method (--method direct), ');
    expect(otherMethods('newton, wegstein, direct')).toBe('');
  });

  it('the ammonia demo stopped after 4 direct passes is not told to try --method direct', () => {
    const r = cli(['solve', 'flowsheets/ammonia-loop.yaml', '--method', 'direct', '--max-passes', '4']);
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/status: not-converged {2}\(direct:/);
    expect(r.stdout).toMatch(/try: another method \(--method newton or --method wegstein\), more passes/);
    expect(r.stdout).not.toMatch(/--method direct/);
  });
});

describe('percentages in the text reports', () => {
  it('a value that rounds to zero has no sign', () => {
    expect(pct(-1e-17)).toBe('0.00 %');
    expect(pct(-4e-5)).toBe('0.00 %');
    expect(pct(-6e-5)).toBe('-0.01 %');
    expect(pct(0.0004)).toBe('+0.04 %');
  });
});
