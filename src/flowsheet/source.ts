/**
 * The parsed document: YAML text -> nodes with source positions. Later stages read values
 * through these helpers so that every problem can be reported at file:line:column.
 */
import { LineCounter, parseDocument, isMap, isSeq, isScalar, isAlias, isPair, Scalar } from 'yaml';
import type { Document, Node, YAMLMap, YAMLSeq, Pair } from 'yaml';
import { DiagnosticBag, didYouMean, type SourceSpan } from '../diagnostics.js';

/** Largest flowsheet file read, in bytes. */
export const MAX_FILE_BYTES = 2 * 1024 * 1024;
/** Largest number of alias references followed in one file (an alias bomb is refused). */
export const MAX_ALIASES = 200;

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
    for (const e of this.doc.errors) {
      const [start, end] = e.pos;
      bag.error(yamlMessage(e.code, e.message), this.span([start, end]), yamlHelp(e.code));
    }
    for (const w of this.doc.warnings) {
      bag.warning(firstLine(w.message), this.span(w.pos));
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
        if (this.aliasBudget === -1) {
          this.bag.error(`more than ${MAX_ALIASES} alias references`, this.at(node),
            'write the values out; loopclose refuses files whose aliases could expand without bound');
        }
        return null;
      }
      const target = node.resolve(this.doc);
      return (target as Node | undefined) ?? null;
    }
    return (node as Node | null) ?? null;
  }

  root(): Node | null {
    return this.resolve(this.doc.contents);
  }
}

function firstLine(text: string): string {
  return text.split("\n")[0];
}

function yamlMessage(code: string, message: string): string {
  const text = firstLine(message).replace(/ at line \d+, column \d+:?$/, '');
  if (code === 'DUPLICATE_KEY') return `duplicate key: ${text.replace(/^Map keys must be unique;?\s*/, '') || 'a key is given twice'}`.replace(/: $/, '');
  return `YAML syntax: ${text}`;
}

function yamlHelp(code: string): string | undefined {
  switch (code) {
    case 'DUPLICATE_KEY':
      return 'each key may appear once in a mapping; remove or rename one of them';
    case 'BAD_INDENT':
    case 'MISSING_CHAR':
      return 'check the indentation and the `:` after each key';
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

  /** Reports keys that are not allowed, with a suggestion. */
  checkKeys(entries: readonly Entry[], allowed: readonly string[], what: string): void {
    for (const e of entries) {
      if (!allowed.includes(e.key)) {
        const hint = didYouMean(e.key, allowed);
        this.bag.error(`unknown key \`${e.key}\` in ${what}`, this.at(e.keyNode),
          hint ?? `the keys of ${what} are: ${allowed.join(', ')}`);
      }
    }
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
