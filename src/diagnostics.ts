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

/** How a diagnostic is drawn: plain, or with colour on a terminal. */
export interface DiagnosticStyle {
  color?: boolean;
}

const RED = '\u001b[1;31m';
const YELLOW = '\u001b[1;33m';
const CYAN = '\u001b[36m';
const BOLD = '\u001b[1m';
const RESET = '\u001b[0m';

/**
 * Renders one diagnostic. The first line follows the GNU convention that editors and CI logs
 * parse, `FILE:LINE:COL: error: MESSAGE` (`loopclose: error: MESSAGE` when it has no place in a
 * file); below it, indented, the source line after its number, a row of `~` under the offending
 * text, and what to change:
 *
 *   flowsheets/loop.yaml:14:18: error: composition of feed `makeup` sums to 0.96, not 1
 *       14:   composition: { H2: 0.72, N2: 0.24 }
 *                          ~~~~~~~~~~~~~~~~~~~~~~
 *       to fix: give every component, or add `normalize: true` to scale the fractions to 1
 */
export function formatDiagnostic(d: Diagnostic, sourceText?: string, style: DiagnosticStyle = {}): string {
  const c = (code: string, text: string) => (style.color ? `${code}${text}${RESET}` : text);
  const label = d.severity === 'error' ? c(RED, 'error') : d.severity === 'warning' ? c(YELLOW, 'warning') : c(CYAN, 'note');
  const s = d.span;
  const where = s ? `${s.file}:${s.line}:${s.col}` : 'loopclose';
  const out: string[] = [`${c(BOLD, `${where}:`)} ${label}: ${d.message}`];
  const text = s ? sourceText?.split(/\r?\n/)[s.line - 1] : undefined;
  if (s && text !== undefined) {
    const num = `    ${s.line}: `;
    const end = s.endLine === s.line ? Math.max(s.endCol, s.col + 1) : text.length + 1;
    const width = Math.max(1, Math.min(end, text.length + 1) - s.col);
    out.push(`${num}${text}`);
    out.push(`${' '.repeat(num.length + Math.max(0, s.col - 1))}${c(style.color ? (d.severity === 'error' ? RED : YELLOW) : '', '~'.repeat(width))}`);
  }
  if (d.help) out.push(`    to fix: ${d.help}`);
  return out.join('\n');
}

export function formatDiagnostics(ds: readonly Diagnostic[], sources: ReadonlyMap<string, string> = new Map(), style: DiagnosticStyle = {}): string {
  return ds.map((d) => formatDiagnostic(d, d.span ? sources.get(d.span.file) : undefined, style)).join('\n\n');
}

/** Diagnostics as JSON objects (the `--json` form of an invalid input). */
export function diagnosticsJson(ds: readonly Diagnostic[]): { status: 'invalid'; diagnostics: Record<string, unknown>[] } {
  return {
    status: 'invalid',
    diagnostics: ds.map((d) => ({
      severity: d.severity,
      message: d.message,
      file: d.span?.file ?? null,
      line: d.span?.line ?? null,
      column: d.span?.col ?? null,
      endLine: d.span?.endLine ?? null,
      endColumn: d.span?.endCol ?? null,
      fix: d.help ?? null,
    })),
  };
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
