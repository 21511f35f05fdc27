/**
 * The parsed document: YAML text -> nodes with source positions. Later stages read values
 * through these helpers so that every problem can be reported at file:line:column.
 */
import { LineCounter, parseDocument, isMap, isSeq, isScalar, isAlias, isPair, isNode, Scalar } from 'yaml';
import type { Document, Node, YAMLMap, YAMLSeq, Pair, YAMLError } from 'yaml';
import { DiagnosticBag, InputError, didYouMean, type SourceSpan } from '../diagnostics.js';

/** Largest flowsheet file read, in bytes. */
export const MAX_FILE_BYTES = 2 * 1024 * 1024;
/** Largest number of alias references followed in one file (an alias bomb is refused). */
export const MAX_ALIASES = 200;
/** Largest number of nodes that aliases may add to the document when expanded. */
export const MAX_ALIAS_EXPANSION = 100_000;
/** Syntax errors reported from one file at most (the parser's later ones are mostly echoes). */
const MAX_SYNTAX_ERRORS = 10;

export class SourceFile {
  readonly lines: LineCounter;
  readonly doc: Document.Parsed;
  private aliasBudget = MAX_ALIASES;

  constructor(readonly path: string, readonly text: string, public bag: DiagnosticBag) {
    this.lines = new LineCounter();
    this.doc = parseDocument(text, {
      lineCounter: this.lines,
      prettyErrors: false,
      uniqueKeys: true,
      keepSourceTokens: false,
      strict: true,
    });
    for (const e of keptErrors(this.doc.errors, (pos) => this.lines.linePos(pos).line)) {
      const [start, end] = e.pos;
      const key = e.code === 'DUPLICATE_KEY' ? (/^("[^"\n]*"|'[^'\n]*'|[^:\n,{}[\]]+?)\s*:/.exec(text.slice(start, start + 200))?.[1] ?? '') : '';
      bag.error(e.code === 'DUPLICATE_KEY' && key && key.length <= 60 && !/\n/.test(key)
        ? `duplicate key \`${key}\`: it is given twice in the same mapping`
        : yamlMessage(e.code, e.message), this.span([start, end]), yamlHelp(e.code, e.message));
    }
    for (const w of this.doc.warnings) {
      bag.warning(firstLine(w.message), this.span(w.pos));
    }
    if (this.doc.errors.length === 0) this.checkAliasExpansion();
  }

  /**
   * Refuses a document whose aliases would expand to more than MAX_ALIAS_EXPANSION nodes
   * (an "alias bomb": a few lines that expand to billions of items). Nothing is expanded:
   * the size of each anchored node is counted once, in document order, with an explicit
   * stack (no recursion, whatever the nesting).
   */
  private checkAliasExpansion(): void {
    const root = this.doc.contents as Node | null;
    if (!root) return;
    const anchors = new Map<string, Node>();
    const size = new Map<Node, number>();
    const open = new Set<Node>();
    let added = 0;
    const kids = (n: Node): (Node | null)[] => {
      if (isMap(n)) return n.items.flatMap((p) => [p.key as Node | null, p.value as Node | null]);
      if (isSeq(n)) return n.items as (Node | null)[];
      return [];
    };
    const stack: { node: Node; kids: (Node | null)[]; i: number; sum: number }[] = [];
    const enter = (n: Node) => {
      if (n.anchor) anchors.set(n.anchor, n);
      open.add(n);
      stack.push({ node: n, kids: kids(n), i: 0, sum: 1 });
    };
    enter(root);
    while (stack.length > 0) {
      const top = stack[stack.length - 1];
      if (top.i < top.kids.length) {
        const c = top.kids[top.i++];
        if (!c || !isNode(c)) {
          top.sum += 1;
          continue;
        }
        if (isAlias(c)) {
          const target = anchors.get(c.source);
          const k = target ? size.get(target) : undefined;
          if (target && (k === undefined || open.has(target))) {
            this.bag.error(`alias \`*${c.source}\` refers to a node that contains it`, this.at(c), 'an alias cannot repeat its own parent; write the values out');
            return;
          }
          added += k ?? 1;
          top.sum += k ?? 1;
          if (added > MAX_ALIAS_EXPANSION) {
            this.bag.error(`the aliases of this file would expand to more than ${MAX_ALIAS_EXPANSION} values`, this.at(c),
              'write the values out, or use fewer nested aliases; loopclose refuses files whose aliases could expand without bound');
            return;
          }
          continue;
        }
        enter(c);
        continue;
      }
      stack.pop();
      open.delete(top.node);
      const total = Math.min(top.sum, MAX_ALIAS_EXPANSION + 1);
      size.set(top.node, total);
      if (stack.length > 0) stack[stack.length - 1].sum += total;
    }
  }

  /** Starts a new validation of the (possibly edited) document with a fresh bag. */
  restart(bag: DiagnosticBag): void {
    this.bag = bag;
    this.aliasBudget = MAX_ALIASES;
  }

  /** The span of a byte range. */
  span(range: readonly number[] | null | undefined): SourceSpan | undefined {
    if (!range) return { file: this.path, line: 1, col: 1, endLine: 1, endCol: 1 };
    const a = this.lines.linePos(range[0]);
    const b = this.lines.linePos(Math.max(range[0], range[1] ?? range[0]));
    return { file: this.path, line: a.line, col: a.col, endLine: b.line, endCol: b.col };
  }

  /** The span of a node, or of the whole file's start when the node is missing. */
  at(node: Node | Pair | null | undefined): SourceSpan | undefined {
    if (!node) return this.span([0, 0]);
    if (isPair(node)) return this.at(node.key as Node);
    return this.span(node.range as number[] | undefined);
  }

  /** Follows an alias to its anchor, within the alias budget. */
  resolve(node: unknown): Node | null {
    if (isAlias(node)) {
      if (--this.aliasBudget < 0) {
        this.bag.error(`more than ${MAX_ALIASES} alias references`, this.at(node),
          'write the values out; loopclose refuses files whose aliases could expand without bound');
        throw new InputError(this.bag.items);
      }
      const target = node.resolve(this.doc);
      return (target as Node | undefined) ?? null;
    }
    return (node as Node | null) ?? null;
  }

  /** Follows an alias without counting it (for a look that reports nothing). */
  peek(node: unknown): Node | null {
    if (isAlias(node)) return (node.resolve(this.doc) as Node | undefined) ?? null;
    return (node as Node | null) ?? null;
  }

  root(): Node | null {
    return this.resolve(this.doc.contents);
  }
}

/** A name from the file as it appears in a message: one line, at most 40 characters. */
export function shown(name: string): string {
  const one = name.replace(/\s*[\r\n]+\s*/g, ' ');
  return one.length > 40 ? `${one.slice(0, 39)}…` : one;
}

/** One name starts with the other (`outlet` and `out`), both at least two letters. */
function prefixPair(a: string, b: string): boolean {
  const x = a.toLowerCase();
  const y = b.toLowerCase();
  return x.length >= 2 && y.length >= 2 && x !== y && (x.startsWith(y) || y.startsWith(x));
}

function firstLine(text: string): string {
  return text.split("\n")[0];
}

function yamlMessage(code: string, message: string): string {
  const text = firstLine(message).replace(/ at line \d+, column \d+:?$/, '');
  if (code === 'DUPLICATE_KEY') return `duplicate key: ${text.replace(/^Map keys must be unique;?\s*/, '') || 'a key is given twice'}`.replace(/: $/, '');
  return `YAML syntax: ${text}`;
}

/**
 * The syntax errors worth showing: duplicate keys always; of the others, the first, and then
 * only those that start two or more lines after the last one shown (a parser that lost its
 * place reports echoes of one mistake on the lines that follow it). At most MAX_SYNTAX_ERRORS.
 */
function keptErrors(errors: readonly YAMLError[], lineOf: (pos: number) => number): YAMLError[] {
  const out: YAMLError[] = [];
  let last = -Infinity;
  let tab = false;
  for (const e of [...errors].sort((a, b) => a.pos[0] - b.pos[0])) {
    const line = lineOf(e.pos[0]);
    // A line indented with a tab moves its mapping's column: every later item of that mapping is
    // then "not at the same column", at lines with nothing wrong. The tab is the one problem.
    if (tab && e.code === 'BAD_INDENT') continue;
    if (e.code === 'TAB_AS_INDENT') tab = true;
    if (e.code !== 'DUPLICATE_KEY') {
      if (line <= last + 1) continue;
      last = line;
    }
    out.push(e);
    if (out.length >= MAX_SYNTAX_ERRORS) break;
  }
  return out;
}

function yamlHelp(code: string, message = ''): string | undefined {
  if (/end with a [}\]]/.test(message)) return 'close every `{` with `}` and every `[` with `]` on the same line, or write the entries on indented lines';
  switch (code) {
    case 'DUPLICATE_KEY':
      return 'each key may appear once in a mapping; remove or rename one of them';
    case 'BAD_INDENT':
    case 'MISSING_CHAR':
      return 'check the indentation and the `:` after each key';
    case 'RESOURCE_EXHAUSTION':
      return 'the file nests too deeply or is too large to read; a flowsheet is a few levels deep';
    case 'TAB_AS_INDENT':
      return 'indent with spaces, not tabs';
    default:
      return undefined;
  }
}

export type YNode = Node;

/** A mapping entry with its key's position. */
export interface Entry {
  key: string;
  keyNode: Node;
  value: Node | null;
  pair: Pair;
}

/** Reads the nodes of one file with positions, reporting problems to the file's bag. */
export class Reader {
  constructor(readonly src: SourceFile) {}

  get bag(): DiagnosticBag {
    return this.src.bag;
  }

  at(node: Node | Pair | null | undefined): SourceSpan | undefined {
    return this.src.at(node);
  }

  isMap(node: Node | null): node is YAMLMap {
    return isMap(node);
  }

  isSeq(node: Node | null): node is YAMLSeq {
    return isSeq(node);
  }

  isScalar(node: Node | null): node is Scalar {
    return isScalar(node);
  }

  /** Entries of a mapping, or null with an error when the node is not a mapping. */
  entries(node: Node | null, what: string, where?: Node | Pair | null): Entry[] | null {
    const n = this.src.resolve(node);
    if (!isMap(n)) {
      this.bag.error(`${what} must be a mapping (\`key: value\` lines or \`{ key: value }\`)`, this.at(n ?? where ?? null),
        `write ${what} as \`{ name: value, ... }\``);
      return null;
    }
    const out: Entry[] = [];
    for (const item of n.items) {
      const key = this.src.resolve(item.key);
      if (!isScalar(key) || (typeof key.value !== 'string' && typeof key.value !== 'number')) {
        this.bag.error(`a key in ${what} must be a plain name`, this.at(key ?? n));
        continue;
      }
      out.push({ key: String(key.value), keyNode: key, value: this.src.resolve(item.value), pair: item as Pair });
    }
    return out;
  }

  /** Unknown keys found by checkKeys, per mapping (for strayNear). */
  private readonly strays = new WeakMap<readonly Entry[], string[]>();

  /** Reports keys that are not allowed, with a suggestion. */
  checkKeys(entries: readonly Entry[], allowed: readonly string[], what: string): void {
    const found: string[] = [];
    for (const e of entries) {
      if (!allowed.includes(e.key)) {
        found.push(e.key);
        const prefix = allowed.filter((a) => prefixPair(e.key, a));
        // `<<` is YAML 1.1's merge key, which this YAML 1.2 reader takes as a plain key: no
        // allowed name is a fix for it.
        // A key that starts with digits, such as `5 degC` of `{ T: 1,5 degC }`: a decimal comma,
        // which a flow mapping reads as the end of one entry and the start of the next.
        const hint = e.key === '<<'
          ? 'merge keys (`<<: *anchor`) are not read: write the keys out here (an alias such as `composition: *gas` may stand for a whole value)'
          : /^\d/.test(e.key)
            ? decimalCommaHint(entries, e)
            : didYouMean(e.key, allowed) ?? (prefix.length ? `did you mean ${prefix.map((a) => `\`${a}\``).join(' or ')}?` : undefined);
        this.bag.error(`unknown key \`${shown(e.key)}\` in ${what}`, this.at(e.keyNode),
          hint ?? `the keys of ${what} are: ${allowed.join(', ')}`);
      }
    }
    this.strays.set(entries, found);
  }

  /**
   * Whether these entries hold an unknown key (already reported) that looks like `key`: then
   * a "`key` is missing" would only repeat the same mistake, and is not reported.
   */
  strayNear(entries: readonly Entry[], ...keys: string[]): boolean {
    const s = this.strays.get(entries);
    if (!s || s.length === 0) return false;
    return s.some((k) => keys.some((key) => prefixPair(k, key) || didYouMean(k, [key]) !== undefined));
  }

  find(entries: readonly Entry[], key: string): Entry | undefined {
    return entries.find((e) => e.key === key);
  }

  /** A scalar's value (string, number, boolean, null) or undefined with an error. */
  scalar(node: Node | null, what: string): string | number | boolean | null | undefined {
    const n = this.src.resolve(node);
    if (!isScalar(n)) {
      this.bag.error(`${what} must be a single value, not a ${isMap(n) ? 'mapping' : isSeq(n) ? 'list' : 'missing value'}`, this.at(n));
      return undefined;
    }
    return n.value as string | number | boolean | null;
  }

  string(node: Node | null, what: string, example?: string): string | undefined {
    const v = this.scalar(node, what);
    if (v === undefined) return undefined;
    if (typeof v !== 'string' || v.trim() === '') {
      this.bag.error(`${what} must be text`, this.at(node), example ? `for example \`${example}\`` : undefined);
      return undefined;
    }
    return v;
  }

  number(node: Node | null, what: string, example?: string): number | undefined {
    const v = this.scalar(node, what);
    if (v === undefined) return undefined;
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      this.bag.error(`${what} must be a number${typeof v === 'string' ? `, not \`${v}\`` : ''}`, this.at(node),
        example ? `for example \`${example}\`` : undefined);
      return undefined;
    }
    return v;
  }

  boolean(node: Node | null, what: string): boolean | undefined {
    const v = this.scalar(node, what);
    if (v === undefined) return undefined;
    if (typeof v !== 'boolean') {
      this.bag.error(`${what} must be true or false`, this.at(node));
      return undefined;
    }
    return v;
  }

  /** Items of a list; a single scalar is taken as a list of one when `single` is set. */
  list(node: Node | null, what: string, single = false): Node[] | null {
    const n = this.src.resolve(node);
    if (isSeq(n)) return n.items.map((i) => this.src.resolve(i)).filter((i): i is Node => i !== null);
    if (single && isScalar(n)) return [n];
    this.bag.error(`${what} must be a list (\`[a, b]\` or \`- a\` lines)`, this.at(n));
    return null;
  }
}

/** The help for a key that starts with digits: the number before it, written with a decimal point. */
function decimalCommaHint(entries: readonly Entry[], e: Entry): string {
  const prev = entries[entries.indexOf(e) - 1];
  const v = prev && isScalar(prev.value) && typeof prev.value.value === 'number' && Number.isInteger(prev.value.value) ? String(prev.value.value) : undefined;
  return v !== undefined
    ? `a decimal comma? In \`{ ... }\` a comma ends an entry, so \`${prev.key}: ${v},${shown(e.key)}\` became two: write a decimal point (\`${prev.key}: ${v}.${shown(e.key)}\`)`
    : `a decimal comma? In \`{ ... }\` a comma ends an entry: write numbers with a decimal point`;
}
