/**
 * The bad-input corpus: every file in test/bad/ is a malformed flowsheet whose first lines
 * say what loopclose must report, one line per problem:
 *   # expect: LINE:COL message
 * The built CLI must exit with code 2, print each expected message as a first line
 * `FILE:LINE:COL: error: MESSAGE` (the GNU convention), print no other error, and never a
 * stack trace.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { cli, ROOT, tempFile } from './helpers/cli.js';
import { validateText } from '../src/flowsheet/validate.js';
import { InputError } from '../src/diagnostics.js';

const DIR = join(ROOT, 'test', 'bad');

interface Expectation {
  line: number;
  col: number;
  message: string;
}

function expectations(text: string): Expectation[] {
  const out: Expectation[] = [];
  for (const l of text.split('\n')) {
    const m = /^# expect: (\d+):(\d+) (.+)$/.exec(l);
    if (m) out.push({ line: Number(m[1]), col: Number(m[2]), message: m[3] });
  }
  return out;
}

/** The `error:` diagnostics of a run: message and location. */
function reported(stderr: string): { message: string; at: string }[] {
  const out: { message: string; at: string }[] = [];
  for (const l of stderr.split('\n')) {
    const m = /^(.*?:\d+:\d+|loopclose): error: (.*)$/.exec(l);
    if (m) out.push({ message: m[2], at: m[1] === 'loopclose' ? '' : m[1] });
  }
  return out;
}

const files = readdirSync(DIR).filter((f) => f.endsWith('.yaml')).sort();

describe('bad-input corpus (test/bad)', () => {
  it('holds at least 40 cases, each with at least one expectation', () => {
    expect(files.length).toBeGreaterThanOrEqual(40);
    for (const f of files) expect(expectations(readFileSync(join(DIR, f), 'utf8')).length, f).toBeGreaterThan(0);
  });

  for (const f of files) {
    it(f, () => {
      const rel = `test/bad/${f}`;
      const want = expectations(readFileSync(join(DIR, f), 'utf8'));
      const r = cli(['solve', rel]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).not.toMatch(/^\s+at .+:\d+:\d+\)?$/m);
      expect(r.stderr).not.toMatch(/internal error/);
      const got = reported(r.stderr);
      for (const w of want) {
        expect(got, `${f}: ${w.message}`).toContainEqual({ message: w.message, at: `${rel}:${w.line}:${w.col}` });
      }
      expect(got.length, r.stderr).toBe(want.length);
      expect(r.stderr).toMatch(new RegExp(`${want.length} errors?; nothing was computed\\.`));
    });
  }
});

describe('all problems of a file at once', () => {
  it('several-problems.yaml: four problems in four places, reported in one run in file order', () => {
    const r = cli(['solve', 'test/bad/several-problems.yaml']);
    expect(r.code).toBe(2);
    const got = reported(r.stderr);
    expect(got.map((d) => d.at)).toEqual([
      'test/bad/several-problems.yaml:10:18',
      'test/bad/several-problems.yaml:13:8',
      'test/bad/several-problems.yaml:26:8',
      'test/bad/several-problems.yaml:31:11',
    ]);
    expect(r.stderr).toMatch(/4 errors; nothing was computed\./);
    // Each problem shows its source line, a marker under the value and what to do, in the
    // project's own layout (no arrow before the location, no bar gutter).
    expect(r.stderr).toMatch(/\n {4}13: {5}P: 150\n {15}~~~\n {4}to fix: write a unit/);
    expect(r.stderr).not.toMatch(/-->|= help:|^\s*\|/m);
    expect(r.stderr).toMatch(/did you mean `splitter`\?/);
  });
});

describe('limits', () => {
  it('a file over the size limit is refused before it is parsed, exit 2', () => {
    const big = tempFile('big.yaml', `# ${'x'.repeat(2 * 1024 * 1024 + 10)}\n`);
    const r = cli(['solve', big]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bytes; the limit is 2097152/);
  });

  it('an alias bomb (10^8 items from 8 lines) is refused without being expanded', () => {
    const text = readFileSync(join(DIR, 'alias-bomb.yaml'), 'utf8');
    let err: unknown;
    try {
      validateText('bomb.yaml', text);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).diagnostics[0].message).toMatch(/aliases of this file would expand to more than 100000/);
  });

  it('a missing file and a folder are input errors, not internal ones', () => {
    const a = cli(['solve', 'test/bad/no-such-file.yaml']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/cannot read test\/bad\/no-such-file\.yaml: no such file/);
    const b = cli(['solve', 'test/bad']);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/is a folder, not a flowsheet file/);
  });

  it('components written as a list: the fix names the mapping to write, and it works', () => {
    const r = cli(['solve', 'test/bad/components-as-list.yaml']);
    expect(r.code).toBe(2);
    const fix = /to fix: write `(components: \{ H2: \{\}, N2: \{\}, CO2: \{\}, H2O: \{\}, CH3OH: \{\} \})`/.exec(r.stderr);
    expect(fix, r.stderr).not.toBeNull();
    const fixed = readFileSync(join(DIR, 'components-as-list.yaml'), 'utf8').replace('components: [H2, N2, CO2, H2O, CH3OH]', fix![1]);
    expect(cli(['solve', tempFile('fixed.yaml', fixed)]).code).toBe(0);
  });

  it('an analyzer\'s uncertainty: the absolute example in the fix is a value that can be written as it stands', () => {
    const demo = readFileSync(join(ROOT, 'flowsheets', 'ammonia-loop.yaml'), 'utf8');
    const bad = demo.replace('components: [NH3], normalized: false, uncertainty: 0.002 }', 'components: [NH3], normalized: false, uncertainty: -0.002 }');
    expect(bad).not.toBe(demo);
    const r = cli(['solve', tempFile('analyzer.yaml', bad)]);
    expect(r.code).toBe(2);
    const fix = /an absolute value such as `([^`]*)` \(a mole fraction\)/.exec(r.stderr);
    expect(fix, r.stderr).not.toBeNull();
    const fixed = bad.replace('uncertainty: -0.002 }', `uncertainty: ${fix![1]} }`);
    expect(cli(['solve', tempFile('analyzer-fixed.yaml', fixed)]).code).toBe(0);
  });

  it('a YAML merge key is refused with a fix that works, not a nearby key name', () => {
    const r = cli(['solve', 'test/bad/yaml-merge-key.yaml']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/to fix: merge keys \(`<<: \*anchor`\) are not read: write the keys out here/);
    expect(r.stderr).not.toMatch(/did you mean/);
    const fixed = readFileSync(join(DIR, 'yaml-merge-key.yaml'), 'utf8').replace('<<: { T: 40 degC, P: 150 bar }', 'T: 40 degC\n    P: 150 bar');
    expect(cli(['solve', tempFile('fixed.yaml', fixed)]).code).toBe(0);
  });

  it('a folder given to report, plot or merge is an input error, not an internal one', () => {
    const out = join(tempFile('x.txt', ''), '..');
    for (const args of [
      ['report', 'test/bad', '--out', join(out, 'r.html')],
      ['plot', 'test/bad', '--x', 'a', '--y', 'b', '--out', join(out, 'p.svg')],
      ['merge', 'test/bad', '--out', join(out, 'm.csv')],
    ]) {
      const r = cli(args);
      expect(r.code, `${args[0]}: ${r.stderr}`).toBe(2);
      expect(r.stderr).toMatch(/cannot read `test\/bad`: it is a folder/);
      expect(r.stderr).not.toMatch(/internal error/);
    }
  });

  it('text that looks like code is only ever read as data', () => {
    const marker = join(tempFile('m.txt', ''), '..', 'pwned');
    const text = `title: "\${require('fs').writeFileSync('${marker}', 'x')}"
components: { H2: !!js/function "function () { return 1 }", N2: {} }
feeds: { f: { composition: { H2: 1 }, molar-flow: 1 mol/s, T: 300 K, P: 1 bar } }
`;
    const r = cli(['solve', tempFile('code.yaml', text)]);
    // The title stays text; the tagged body of H2 is a string, which is not a component body.
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/component `H2` must be `\{\}`, `library` or a mapping of constants/);
    expect(() => readFileSync(marker)).toThrow();
  });
});

describe('structural checks through the library', () => {
  it('a trapped component is an InputError with a span and a help line', () => {
    let err: InputError | undefined;
    try {
      validateText('x.yaml', readFileSync(join(DIR, 'inert-without-purge.yaml'), 'utf8'));
    } catch (e) {
      err = e as InputError;
    }
    expect(err).toBeInstanceOf(InputError);
    const d = err!.diagnostics.filter((x) => x.severity === 'error');
    expect(d).toHaveLength(1);
    expect(d[0].span).toMatchObject({ file: 'x.yaml', line: 20, col: 3 });
    expect(d[0].help).toMatch(/recovery above zero to the outlet `liquid-ammonia`/);
  });
});

describe('a suggested fix works when written', () => {
  it('a condenser with no pressure is told of `P` and of `dp`, and either makes a valid file', () => {
    const text = readFileSync(join(DIR, 'condenser-no-temperature.yaml'), 'utf8').replace('    P: 145 bar\n', '    T: -10 degC\n');
    let err: InputError | undefined;
    try {
      validateText('x.yaml', text);
    } catch (e) {
      err = e as InputError;
    }
    expect(err).toBeInstanceOf(InputError);
    const d = err!.diagnostics.filter((x) => x.severity === 'error');
    expect(d.map((x) => x.message)).toEqual(['unit `chiller` has no `P`']);
    expect(d[0].help).toBe('add `P: 29 barg` or the drop from the inlet, `dp: 0.2 bar`');
    expect(() => validateText('x.yaml', text.replace('    T: -10 degC\n', '    T: -10 degC\n    P: 29 barg\n'))).not.toThrow();
    expect(() => validateText('x.yaml', text.replace('    T: -10 degC\n', '    T: -10 degC\n    dp: 0.2 bar\n'))).not.toThrow();
  });
});

describe('a decimal comma in a flow mapping', () => {
  it('the help writes the value back with a decimal point, and that fix is valid', () => {
    const text = readFileSync(join(DIR, 'decimal-comma.yaml'), 'utf8');
    let err: InputError | undefined;
    try {
      validateText('x.yaml', text);
    } catch (e) {
      err = e as InputError;
    }
    const d = err!.diagnostics.find((x) => x.message.startsWith('unknown key'))!;
    expect(d.help).toBe('a decimal comma? In `{ ... }` a comma ends an entry, so `T: -23,5 degC` became two: write a decimal point (`T: -23.5 degC`)');
    expect(() => validateText('x.yaml', text.replaceAll('T: -23,5 degC', 'T: -23.5 degC'))).not.toThrow();
  });
});
