import { describe, expect, it } from 'vitest';
import { otherMethods } from '../../src/report/format.js';
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
