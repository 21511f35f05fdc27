/** Small helpers shared by the terminal reporters: number formatting and aligned tables. */

export const CAUTION =
  'Results must be reviewed by a qualified engineer. They are not for relief, safety or code-compliance design; local codes and licensed practice govern.';

/** A number with `sig` significant figures, in plain or exponent form as fits. */
export function num(v: number, sig = 5): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '-';
  if (!Number.isFinite(v)) return v > 0 ? 'inf' : '-inf';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e7) {
    const digits = Math.max(0, sig - 1 - Math.floor(Math.log10(a)));
    return v.toFixed(Math.min(digits, 10));
  }
  return v.toExponential(Math.max(0, sig - 1));
}

export function pct(v: number, digits = 2): string {
  if (!Number.isFinite(v)) return '-';
  // A value that rounds to zero prints without a sign ('-0.00 %' claimed a direction it has not).
  const s = (v * 100).toFixed(digits);
  if (Number(s) === 0) return `${(0).toFixed(digits)} %`;
  return `${v > 0 ? '+' : ''}${s} %`;
}

export type Align = 'left' | 'right';

/** An aligned text table. */
export function table(header: string[], rows: string[][], align?: Align[]): string {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => (r[c] ?? '').length)));
  const al = align ?? header.map((_, c) => (c === 0 ? 'left' : 'right'));
  const line = (cells: string[]) =>
    cells.map((s, c) => (al[c] === 'left' ? s.padEnd(widths[c]) : s.padStart(widths[c]))).join('  ').trimEnd();
  return [line(header), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}

/** JSON with Float64Arrays as plain arrays and non-finite numbers as null (never NaN in output). */
export function toJson(value: unknown, indent = 2): string {
  return JSON.stringify(value, (_k, v) => {
    if (v instanceof Float64Array) return Array.from(v, (x) => (Number.isFinite(x) ? x : null));
    if (typeof v === 'number' && !Number.isFinite(v)) return null;
    if (v instanceof Map) return Object.fromEntries(v);
    return v;
  }, indent);
}

/** One CSV field, quoted when needed (RFC 4180). */
export function csvField(v: string | number): string {
  const s = typeof v === 'number' ? (Number.isFinite(v) ? String(v) : '') : v;
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function csvLine(fields: (string | number)[]): string {
  return fields.map(csvField).join(',');
}

/** "another method (--method A or --method B), " naming only the methods this solve did not use. */
export function otherMethods(used: string): string {
  const others = ['newton', 'wegstein', 'direct'].filter((m) => !used.includes(m));
  return others.length ? `another method (${others.map((m) => `--method ${m}`).join(' or ')}), ` : '';
}
