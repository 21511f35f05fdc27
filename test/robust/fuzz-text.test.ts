/**
 * Fuzzing the input path with random text and mutated demo files (fast-check, fixed seeds):
 * validation throws nothing but InputError (whose every error has a message, and a position
 * inside the file when it has one); a file that validates solves to a status; and the CLI
 * never crashes: its exit code is 0, 2, 3 or 4, with no stack trace.
 */
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { resultObject } from '../../src/report/solve.js';
import { InputError } from '../../src/diagnostics.js';
import { cli, tempFile } from '../helpers/cli.js';
import { nonFinitePaths } from './gen.js';

const DEMOS = ['methanol-pilot', 'methanol-pilot-split', 'ammonia-loop', 'benzene-hydrogenation'].map((f) => readFileSync(`flowsheets/${f}.yaml`, 'utf8'));

/** Pieces that make YAML and flowsheets go wrong in interesting ways. */
const TOKENS = [':', ' ', '\n', '  ', '\t', '{', '}', '[', ']', ',', '-', '#', '&a', '*a', '"', "'", '!!str', '|', '>', '?',
  '0', '-1', '1e308', '1e-320', 'NaN', '.inf', '-.inf', 'null', '~', 'true', 'rest', 'barg', 'degC', 'mol/s', 'm3/h', 'K', 'Pa',
  'type', 'in', 'out', 'mixer', 'reactor', 'splitter', 'separator', 'condenser', 'flash', 'feeds', 'units', 'components', 'H2', 'N2',
  'CO2', 'composition', 'conversion', 'equation', '->', 'key', 'recycle', 'purge', '\u00b0C', '\u0000', '\ufeff', '\r\n'];

type Mutation =
  | { kind: 'delete'; at: number; len: number }
  | { kind: 'insert'; at: number; text: string }
  | { kind: 'number'; at: number; text: string }
  | { kind: 'dupline'; at: number }
  | { kind: 'swaplines'; at: number; to: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('delete' as const), at: fc.nat(), len: fc.integer({ min: 1, max: 40 }) }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.oneof(fc.constantFrom(...TOKENS), fc.string({ maxLength: 8 })) }),
  fc.record({ kind: fc.constant('number' as const), at: fc.nat(), text: fc.constantFrom('0', '-3', '1e9', '1e-12', '0.999999', '2', 'abc', '1e400', '') }),
  fc.record({ kind: fc.constant('dupline' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('swaplines' as const), at: fc.nat(), to: fc.nat() }),
);

function mutate(text: string, ms: readonly Mutation[]): string {
  let t = text;
  for (const m of ms) {
    const at = m.at % (t.length + 1);
    if (m.kind === 'delete') t = t.slice(0, at) + t.slice(at + m.len);
    else if (m.kind === 'insert') t = t.slice(0, at) + m.text + t.slice(at);
    else if (m.kind === 'number') {
      // Replace the next number after `at`.
      const re = /-?\d+(\.\d+)?(e-?\d+)?/g;
      re.lastIndex = at;
      const hit = re.exec(t) ?? /-?\d+(\.\d+)?/.exec(t);
      if (hit) t = t.slice(0, hit.index) + m.text + t.slice(hit.index + hit[0].length);
    } else {
      const lines = t.split('\n');
      const a = m.at % lines.length;
      if (m.kind === 'dupline') lines.splice(a, 0, lines[a]);
      else {
        const b = m.to % lines.length;
        [lines[a], lines[b]] = [lines[b], lines[a]];
      }
      t = lines.join('\n');
    }
  }
  return t;
}

const mutatedDemo = fc.record({ demo: fc.nat({ max: DEMOS.length - 1 }), ms: fc.array(mutation, { minLength: 1, maxLength: 4 }) })
  .map(({ demo, ms }) => mutate(DEMOS[demo], ms));

const randomText = fc.oneof(
  fc.string({ maxLength: 200 }),
  fc.array(fc.constantFrom(...TOKENS), { maxLength: 60 }).map((a) => a.join('')),
  fc.array(fc.constantFrom(...TOKENS), { maxLength: 60 }).map((a) => `components: { H2: {}, N2: {} }\nfeeds:\n  f: ${a.join('')}\n`),
);

type Outcome = 'input-error' | 'converged' | 'not-converged' | 'infeasible' | 'invalid';

function validateAndSolve(text: string): Outcome {
  let model;
  try {
    model = validateText('fuzz.yaml', text).model;
  } catch (e) {
    if (!(e instanceof InputError)) throw new Error(`not an InputError: ${(e as Error)?.stack ?? e}\n--- input ---\n${text}`);
    const errors = e.diagnostics.filter((d) => d.severity === 'error');
    expect(errors.length, text).toBeGreaterThan(0);
    const lines = text.split(/\r?\n/).length;
    for (const d of errors) {
      expect(d.message, text).toBeTruthy();
      expect(d.message, text).not.toMatch(/\[object Object\]/);
      if (!/undefined/.test(text)) expect(d.message, text).not.toMatch(/undefined/);
      if (!/NaN/i.test(text)) expect(d.message, text).not.toMatch(/NaN/);
      expect(d.message.length, text).toBeLessThan(400);
      if (d.span) {
        expect(d.span.line, text).toBeGreaterThanOrEqual(1);
        expect(d.span.line, text).toBeLessThanOrEqual(lines + 1);
        expect(d.span.col, text).toBeGreaterThanOrEqual(1);
      }
    }
    return 'input-error';
  }
  const r = solveFlowsheet(model, { maxPasses: 300 });
  expect(['converged', 'not-converged', 'infeasible', 'invalid'], text).toContain(r.status);
  expect(nonFinitePaths(resultObject(r)), text).toEqual([]);
  return r.status as Outcome;
}

function tally(arb: fc.Arbitrary<string>, seed: number, numRuns: number): Record<Outcome, number> {
  const seen: Record<Outcome, number> = { 'input-error': 0, converged: 0, 'not-converged': 0, infeasible: 0, invalid: 0 };
  fc.assert(fc.property(arb, (text) => {
    seen[validateAndSolve(text)]++;
  }), { seed, numRuns });
  console.log(`seed ${seed}: ${JSON.stringify(seen)}`);
  return seen;
}

describe('random text and mutated demo files through the library', () => {
  it('mutated demo files: 400 runs, seed 4242', () => {
    const seen = tally(mutatedDemo, 4242, 400);
    expect(seen['input-error']).toBeGreaterThan(50);
    expect(seen.converged).toBeGreaterThan(20);
  });

  it('random text: 1500 runs, seed 99', () => {
    const seen = tally(randomText, 99, 1500);
    expect(seen['input-error']).toBeGreaterThan(1000);
  });
});

describe('the CLI on fuzzed files', () => {
  it('mutated demos and random text: 30 runs, seed 31337, exit 0, 2, 3 or 4 and never a stack trace', () => {
    const codes = new Map<number, number>();
    fc.assert(fc.property(fc.oneof(mutatedDemo, randomText), (text) => {
      const r = cli(['solve', tempFile('fuzz.yaml', text), '--max-passes', '300']);
      expect([0, 2, 3, 4], `${r.stderr}\n--- input ---\n${text}`).toContain(r.code);
      expect(r.stderr, text).not.toMatch(/internal error|^\s+at .+:\d+:\d+\)?$/m);
      codes.set(r.code, (codes.get(r.code) ?? 0) + 1);
    }), { seed: 31337, numRuns: 30 });
    expect(codes.get(2) ?? 0).toBeGreaterThan(5);
  });
});

describe('regression cases found by the fuzzer', () => {
  it('seed 4242: text glued before the first comment makes one unknown key, quoted as written', () => {
    let err: InputError | undefined;
    try {
      validateText('m.yaml', `NaN${DEMOS[0]}`);
    } catch (e) {
      err = e as InputError;
    }
    expect(err).toBeInstanceOf(InputError);
    expect(err!.diagnostics.map((d) => d.message)).toEqual(['unknown key `NaN# An invented scenario` in the flowsheet file']);
    expect(err!.diagnostics[0].span).toMatchObject({ line: 1, col: 1 });
  });

  it('a long key over several lines is quoted on one line and shortened', () => {
    let err: InputError | undefined;
    try {
      validateText('k.yaml', `"${'x'.repeat(30)}\\n${'y'.repeat(30)}": 1\ncomponents: { H2: {} }\nfeeds: {}\n`);
    } catch (e) {
      err = e as InputError;
    }
    const d = err!.diagnostics.find((x) => /^unknown key/.test(x.message))!;
    expect(d.message).toBe(`unknown key \`${'x'.repeat(30)} ${'y'.repeat(8)}…\` in the flowsheet file`);
  });
});
