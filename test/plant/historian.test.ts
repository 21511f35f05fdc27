/**
 * `loopclose reconcile --readings`: how a historian export's rows are read and answered, through
 * the built CLI, on the first hours of the ammonia demo's year (flowsheets/data/ammonia-loop-year.csv).
 * Each row's answer is checked against the snapshot of the same readings (the file's
 * `readings:`), so that a row does not depend on a bad row before it; rows whose fields do not
 * match the column line are refused (RFC 4180, sec. 2, rule 4: every line has the same number of
 * fields); a first row with a bad timestamp is a row, not a unit line; everything left out is said.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cli, tempFile } from '../helpers/cli.js';

const DEMO = 'flowsheets/ammonia-loop.yaml';

/** The column line, the unit line and the first `n` rows of the demo's year. */
function firstHours(n: number): { head: string; units: string; rows: string[] } {
  const lines = readFileSync('flowsheets/data/ammonia-loop-year.csv', 'utf8').split('\n');
  const at = lines.findIndex((l) => l.startsWith('timestamp'));
  return { head: lines[at], units: lines[at + 1], rows: lines.slice(at + 2, at + 2 + n) };
}

/** Fields of a CSV line as loopclose writes it (RFC 4180 quoting). */
function fields(line: string): string[] {
  const out: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') {
        cur += '"';
        i++;
      } else if (c === '"') quoted = false;
      else cur += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      out.push(cur);
      cur = '';
    } else cur += c;
  }
  out.push(cur);
  return out;
}

/** The output's rows as records keyed by column name. */
function rowsOf(stdout: string): Record<string, string>[] {
  const lines = stdout.split('\n').filter((l) => l !== '' && !l.startsWith('#'));
  const names = fields(lines[0]);
  return lines.slice(1).map((l) => Object.fromEntries(fields(l).map((v, k) => [names[k], v])));
}

/** The demo flowsheet with its snapshot replaced by one row of the export. */
function snapshotOf(head: string, units: string, row: string): string {
  const names = head.split(',');
  const unit = units.split(',');
  const cells = row.split(',');
  const flat: string[] = [];
  const analyzers = new Map<string, string[]>();
  for (let c = 1; c < names.length; c++) {
    const [tag, comp] = names[c].split('.');
    if (comp) analyzers.set(tag, [...(analyzers.get(tag) ?? []), `${comp}: ${cells[c]}`]);
    else flat.push(`  ${tag}: ${cells[c]} ${unit[c]}`);
  }
  for (const [tag, parts] of analyzers) flat.push(`  ${tag}: { ${parts.join(', ')} }`);
  const text = readFileSync(DEMO, 'utf8').replace(/\nreadings:[\s\S]*$/, '\n');
  return `${text}readings:\n${flat.join('\n')}\n`;
}

describe('a row is answered as its own snapshot, whatever the row before it', () => {
  it('a scale slip on one row (FI-120 read 100 times low) does not carry into the rows after it', () => {
    const { head, units, rows } = firstHours(3);
    const slipped = [rows[0].replace(',10896.3,', ',108.963,'), rows[1], rows[2]];
    expect(slipped[0]).not.toBe(rows[0]);
    const r = cli(['reconcile', DEMO, '--readings', tempFile('slip.csv', [head, units, ...slipped].join('\n') + '\n')]);
    expect(r.code, r.stderr).toBe(0);
    const out = rowsOf(r.stdout);
    expect(out[0].status).toBe('gross-error');
    // Row 2 against the snapshot of the same readings (the file's `readings:`, a cold start).
    const snap = cli(['reconcile', tempFile('row2.yaml', snapshotOf(head, units, rows[1])), '--json']);
    expect(snap.code, snap.stderr).toBe(0);
    const s = JSON.parse(snap.stdout);
    expect(s.status).toBe('reconciled');
    expect(out[1].status).toBe(s.status);
    // The same readings and the same start give the same answer (before: a warm start from the
    // slipped row's solution, gamma about 1.8e5 with FI-101 and FI-310 suspect at +100 %).
    expect(Number(out[1]['global.statistic'])).toBeCloseTo(s.globalTest.statistic, 9);
    expect(Number(out[1]['FI-101.reconciled[mol/s]'])).toBeCloseTo(s.instruments['FI-101'].molarFlow.reconciled, 9);
    expect(out[1].suspects).toBe('');
  });
});

describe('rows of an export as a historian writes them', () => {
  it('a row with more or fewer fields than the column line is invalid, not read shifted (RFC 4180 sec. 2 rule 4)', () => {
    const { head, units, rows } = firstHours(3);
    const comma = rows[0].replace(',148.7579,', ',148,7579,'); // an unquoted decimal comma
    const dropped = rows[1].replace(',40.36,', ','); // a cell dropped
    expect(fields(comma).length).toBe(21);
    expect(fields(dropped).length).toBe(19);
    const file = tempFile('fields.csv', [head, units, comma, dropped, rows[2]].join('\n') + '\n');
    const r = cli(['reconcile', DEMO, '--readings', file]);
    expect(r.code).toBe(2);
    const out = rowsOf(r.stdout);
    expect(out).toHaveLength(3);
    expect(out[0].status).toBe('invalid');
    expect(out[0].message).toMatch(/fields\.csv:3:1: the row has 21 fields, the column line 20: its cells cannot be matched to their columns/);
    expect(out[0]['FI-101.measured[mol/s]']).toBe('');
    expect(out[1].status).toBe('invalid');
    expect(out[1].message).toMatch(/fields\.csv:4:1: the row has 19 fields, the column line 20/);
    expect(out[2].status).toBe('reconciled');
  });

  it('a row of the wrong width neither counts in nor breaks a frozen meter\'s run (--frozen 3)', () => {
    const { head, units, rows } = firstHours(5);
    const col = head.split(',').indexOf('FI-120');
    const frozen = rows.map((l) => l.split(',').map((v, k) => (k === col ? '11000.0' : v)).join(','));
    frozen[2] = frozen[2].replace(',148.8132,', ',148,8132,'); // shifts FI-120's cell by one
    const r = cli(['reconcile', DEMO, '--readings', tempFile('fz.csv', [head, units, ...frozen].join('\n') + '\n'), '--frozen', '3', '--block', '2']);
    expect(r.code).toBe(2);
    const out = rowsOf(r.stdout);
    expect(out.map((o) => o.status)).toEqual(['reconciled', 'reconciled', 'invalid', expect.stringMatching(/reconciled|gross-error/), expect.stringMatching(/reconciled|gross-error/)]);
    expect(out[1]['left-out']).not.toMatch(/FI-120/);
    // Rows 1, 2, 4 and 5 read 11000.0 (row 3 cannot be read): row 4 is the third readable row running, row 5 the fourth.
    expect(out[3]['left-out']).toContain('FI-120: left out: frozen: the same value 11000.0 for 3 rows running');
    expect(out[4]['left-out']).toContain('FI-120: left out: frozen: the same value 11000.0 for 4 rows running');
  });

  it('a first row with a bad timestamp, and no unit line, is a row said invalid: not taken for the unit line', () => {
    const { head, rows } = firstHours(3);
    for (const first of ['01.01.2024 00:00', 'Shutdown']) {
      const row0 = first === 'Shutdown' ? `Shutdown${','.repeat(19)}` : rows[0].replace(/^[^,]*/, first);
      const file = tempFile('first.csv', [head, row0, rows[1], rows[2]].join('\n') + '\n');
      const r = cli(['reconcile', DEMO, '--readings', file]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).not.toMatch(/internal error/);
      const out = rowsOf(r.stdout);
      expect(out).toHaveLength(3);
      expect(out[0].status).toBe('invalid');
      expect(out[0].message).toContain(`first.csv:2:1: the timestamp \`${first}\` is not an ISO 8601 date and time`);
      expect(out[1].status).toBe('reconciled');
    }
  });

  it('an analyzer left out whole is said even when one of its cells is empty in the same row', () => {
    const { head, units, rows } = firstHours(1);
    // AI-205.H2 empty, AI-205.N2 written in percent (21.872 for 0.21872).
    const row = rows[0].replace(',0.68897,0.21872,', ',,21.872,');
    const r = cli(['reconcile', DEMO, '--readings', tempFile('an.csv', [head, units, row].join('\n') + '\n')]);
    expect(r.code, r.stderr).toBe(0);
    const out = rowsOf(r.stdout);
    expect(out[0]['left-out']).toContain('AI-205.H2: no reading (empty cell)');
    expect(out[0]['left-out']).toContain('AI-205: left out: the fraction of N2 is 21.872, outside 0..1');
    expect(out[0]['AI-205.N2.measured']).toBe('');
  });

  it('a cell that is not a number is located at its column in the line as written (quoted and padded cells before it)', () => {
    const { head, units, rows } = firstHours(1);
    const row = rows[0].replace(/^([^,]*),148.7579,40.61,20.3051,/, '"$1",148.7579,  40.61 ,I/O Timeout,');
    // "2024-01-01T00:00Z", is 20 characters, 148.7579, 9 and "  40.61 ," 9: the cell starts at column 39.
    expect(row.indexOf('I/O Timeout') + 1).toBe(39);
    const r = cli(['reconcile', DEMO, '--readings', tempFile('q.csv', [head, units, row].join('\n') + '\n')]);
    expect(r.code, r.stderr).toBe(0);
    expect(rowsOf(r.stdout)[0]['left-out']).toContain('FI-101: left out: `I/O Timeout` at ');
    expect(rowsOf(r.stdout)[0]['left-out']).toMatch(/q\.csv:3:39 is not a number/);
  });
});

describe('the layout of the file', () => {
  it('a file separated by semicolons (or tabs) is one message saying so, not one per tag', () => {
    const { head, units, rows } = firstHours(2);
    for (const [sep, word] of [[';', 'semicolons'], ['\t', 'tabs']]) {
      const text = [head, units, ...rows].map((l) => l.replaceAll(',', sep)).join('\n') + '\n';
      const r = cli(['reconcile', DEMO, '--readings', tempFile('semi.csv', text)]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(new RegExp(`semi\\.csv:1:10: error: \`[^\`]*semi\\.csv\` is not comma-separated: its column line holds ${word} and no comma`));
      expect(r.stderr).not.toMatch(/has no column/);
    }
  });

  it('an export with no rows (only its column and unit lines) is an error, exit 2, nothing written', () => {
    const { head, units } = firstHours(0);
    const out = tempFile('out.csv', '');
    const r = cli(['reconcile', DEMO, '--readings', tempFile('none.csv', `${head}\n${units}\n`), '--out', out, '--overwrite']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/none\.csv:2:1: error: `[^`]*none\.csv` has no rows of readings, only its column line and unit line/);
    expect(readFileSync(out, 'utf8')).toBe('');
  });

  it('--frozen 1 is refused (it would leave out every reading; it was taken as never, unsaid)', () => {
    const { head, units, rows } = firstHours(1);
    const r = cli(['reconcile', DEMO, '--readings', tempFile('one.csv', [head, units, ...rows].join('\n') + '\n'), '--frozen', '1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--frozen 1 would leave out every reading: give 2 or more rows, or 0 for never/);
  });

  it('a byte order mark before a comment line and CRLF line ends (RFC 4180 sec. 2 rule 1) read as the plain file', () => {
    const { head, units, rows } = firstHours(2);
    const plain = cli(['reconcile', DEMO, '--readings', tempFile('plain.csv', ['# from the historian', head, units, ...rows].join('\n') + '\n')]);
    expect(plain.code, plain.stderr).toBe(0);
    const r = cli(['reconcile', DEMO, '--readings', tempFile('bom.csv', '\ufeff' + ['# from the historian', head, units, ...rows].join('\r\n') + '\r\n\r\n')]);
    expect(r.code, r.stderr).toBe(0);
    // The rows are the same (the header differs only in the export's digest and name).
    expect(r.stdout.split('\n').slice(3)).toEqual(plain.stdout.split('\n').slice(3));
  });
});

describe('timestamps', () => {
  it('a repeated instant (ISO 8601: 02:00+01:00 is 01:00Z) and a step back in time are said in their rows, which are still answered', () => {
    const { head, units, rows } = firstHours(4);
    const again = rows[1].replace(/^[^,]*/, '2024-01-01T02:00+01:00'); // the instant of rows[1] (2024-01-01T01:00Z)
    const file = tempFile('times.csv', [head, units, rows[0], rows[1], again, rows[3], rows[2]].join('\n') + '\n');
    const r = cli(['reconcile', DEMO, '--readings', file]);
    expect(r.code, r.stderr).toBe(0);
    const out = rowsOf(r.stdout);
    expect(out).toHaveLength(5);
    expect(out[2]['left-out']).toBe('timestamp: the same instant as line 4 (a doubled row, or local time at a daylight-saving change?)');
    expect(out[4].timestamp).toBe('2024-01-01T02:00Z');
    expect(out[4]['left-out']).toBe('timestamp: earlier than line 6, the row before it');
    for (const k of [0, 1, 3]) expect(out[k]['left-out']).toBe('');
    for (const row of out) expect(row.status).toMatch(/^(reconciled|gross-error)$/);
  });
});

describe('resume of a reconciliation over time', () => {
  it('an export changed since the run started is refused, saying so (not "the command differs")', () => {
    const { head, units, rows } = firstHours(4);
    const readings = tempFile('hours.csv', [head, units, ...rows].join('\n') + '\n');
    const out = tempFile('out.csv', '');
    expect(cli(['reconcile', DEMO, '--readings', readings, '--out', out, '--overwrite']).code).toBe(0);
    const lines = readFileSync(out, 'utf8').split('\n');
    writeFileSync(out, `${lines.slice(0, 4 + 2).join('\n')}\n`);
    // The same command, the same flowsheet; one reading of the last row changed.
    writeFileSync(readings, [head, units, ...rows.slice(0, 3), rows[3].replace(/^([^,]*),([^,]*),/, '$1,150.5,')].join('\n') + '\n');
    const r = cli(['reconcile', DEMO, '--readings', readings, '--out', out, '--resume']);
    expect(r.code).toBe(2);
    expect(r.stderr).not.toMatch(/the command differs/);
    expect(r.stderr).toMatch(/a file the command reads has changed since `[^`]*out\.csv` was started \(the command and the flowsheet are the same/);
    expect(r.stderr).toMatch(/the --readings export/);
  });
});
