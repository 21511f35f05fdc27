/**
 * Diagnostics: what is wrong, where, and what to do (one message per problem, all problems of
 * a file at once where possible). A user's mistake is never a stack trace.
 */

export interface SourceSpan {
  file: string;
  /** 1-based line and column of the start. */
  line: number;
  col: number;
  /** 1-based line and column just past the end (same line when the span is one line). */
  endLine: number;
  endCol: number;
}

export type Severity = 'error' | 'warning' | 'note';

export interface Diagnostic {
  severity: Severity;
  message: string;
  span?: SourceSpan;
  help?: string;
}

/** Collects diagnostics while a stage runs. */
export class DiagnosticBag {
  readonly items: Diagnostic[] = [];

  error(message: string, span?: SourceSpan, help?: string): void {
    this.items.push({ severity: 'error', message, span, help });
  }

  warning(message: string, span?: SourceSpan, help?: string): void {
    this.items.push({ severity: 'warning', message, span, help });
  }

  get hasErrors(): boolean {
    return this.items.some((d) => d.severity === 'error');
  }

  errors(): Diagnostic[] {
    return this.items.filter((d) => d.severity === 'error');
  }

  warnings(): Diagnostic[] {
    return this.items.filter((d) => d.severity !== 'error');
  }
}

/** Thrown between stages when the input has errors; carries every diagnostic found. */
export class InputError extends Error {
  constructor(readonly diagnostics: Diagnostic[]) {
    super(diagnostics.filter((d) => d.severity === 'error').map((d) => d.message).join('; ') || 'invalid input');
    this.name = 'InputError';
  }
}

/** Renders one diagnostic in the compiler style: message, location, the source line, a caret, help. */
export function formatDiagnostic(d: Diagnostic, sourceText?: string): string {
  const out: string[] = [`${d.severity}: ${d.message}`];
  if (d.span) {
    const s = d.span;
    out.push(`  --> ${s.file}:${s.line}:${s.col}`);
    const lines = sourceText?.split(/\r?\n/);
    const text = lines?.[s.line - 1];
    if (text !== undefined) {
      const num = String(s.line);
      const pad = ' '.repeat(num.length);
      const end = s.endLine === s.line ? Math.max(s.endCol, s.col + 1) : text.length + 1;
      const width = Math.max(1, Math.min(end, text.length + 1) - s.col);
      out.push(`${pad} |`);
      out.push(`${num} | ${text}`);
      out.push(`${pad} | ${' '.repeat(Math.max(0, s.col - 1))}${'^'.repeat(width)}`);
      if (d.help) out.push(`${pad} = help: ${d.help}`);
      return out.join('\n');
    }
  }
  if (d.help) out.push(`  = help: ${d.help}`);
  return out.join('\n');
}

export function formatDiagnostics(ds: readonly Diagnostic[], sources: ReadonlyMap<string, string> = new Map()): string {
  return ds.map((d) => formatDiagnostic(d, d.span ? sources.get(d.span.file) : undefined)).join('\n\n');
}

/** Levenshtein distance, for "did you mean" suggestions. */
export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  if (m === 0) return n;
  if (n === 0) return m;
  let prev = new Array<number>(n + 1);
  let cur = new Array<number>(n + 1);
  for (let j = 0; j <= n; j++) prev[j] = j;
  for (let i = 1; i <= m; i++) {
    cur[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1;
      cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
    }
    [prev, cur] = [cur, prev];
  }
  return prev[n];
}

/** Up to k candidates close to `name` (case-insensitive distance at most about a third of its length). */
export function nearest(name: string, candidates: Iterable<string>, k = 3): string[] {
  const lower = name.toLowerCase();
  const limit = Math.max(2, Math.ceil(name.length / 3));
  const scored: [string, number][] = [];
  for (const c of candidates) {
    const d = editDistance(lower, c.toLowerCase());
    if (d <= limit) scored.push([c, d]);
  }
  scored.sort((x, y) => x[1] - y[1] || x[0].localeCompare(y[0]));
  return scored.slice(0, k).map((s) => s[0]);
}

export function didYouMean(name: string, candidates: Iterable<string>): string | undefined {
  const near = nearest(name, candidates);
  if (near.length === 0) return undefined;
  return `did you mean ${near.map((n) => `\`${n}\``).join(' or ')}?`;
}
