/**
 * Inputs addressed by their path in the file: `reactor.reactions.0.conversion`,
 * `purge-split.out.purge`, `feeds.hydrogen.meter.flow`. A path that starts with a top-level
 * key (feeds, thermo, solver, components) is taken from the top; any other starts at a unit.
 * The document is parsed once; each set of values edits its scalars in place and is validated
 * again, so every value is checked exactly as if it had been written in the file.
 */
import { isMap, isScalar, isSeq, type Node, type Scalar } from 'yaml';
import { DiagnosticBag, InputError, didYouMean } from '../diagnostics.js';
import { parseSource, readFlowsheetFile, validateSource, type LoadedFile } from '../flowsheet/validate.js';
import type { SourceFile } from '../flowsheet/source.js';
import { parseQuantity, UnitError, type Dimension } from '../units/index.js';

const TOP = new Set(['feeds', 'thermo', 'solver', 'components', 'units', 'display', 'tears', 'targets', 'title']);

export interface InputRef {
  /** As written by the user. */
  text: string;
  /** Path in the document. */
  docPath: (string | number)[];
  node: Scalar;
  /** The unit the file writes this value in ('' for a plain number). */
  fileUnit: string;
  /** The dimension of the value in the file (undefined for a plain number). */
  dimension?: Dimension;
  /** The value in the file, SI. */
  baseValue: number;
  /** The original scalar value (restored by `reset`). */
  original: unknown;
  /**
   * For an outlet written `rest` (a splitter of two outlets): the other outlet's fraction,
   * which is set to 1 - value so that this one takes `value`.
   */
  complement?: { node: Scalar; original: unknown };
}

/** An outlet written `rest` as an input: only with exactly one other, numeric outlet. */
function restInput(text: string, docPath: (string | number)[], node: Scalar, parent: unknown): InputRef {
  const others = isMap(parent) ? parent.items.filter((it) => it.value !== node) : [];
  const other = others.length === 1 ? others[0].value : undefined;
  if (!isScalar(other) || typeof other.value !== 'number') {
    throw inputError(`input path \`${text}\` leads to \`rest\`, and its splitter has ${others.length + 1} outlets`,
      'vary an outlet written as a number, or give this one a number and another `rest`');
  }
  return { text, docPath, node, fileUnit: '', baseValue: 1 - other.value, original: 'rest', complement: { node: other, original: other.value } };
}

const DIMENSIONS: Dimension[] = ['pressure', 'temperature', 'molarFlow', 'massFlow', 'volumeFlow', 'standardFlow', 'molarMass', 'density'];

export class ParametricFlowsheet {
  readonly src: SourceFile;
  readonly base: LoadedFile;
  private readonly refs = new Map<string, InputRef>();

  constructor(readonly file: string, text?: string) {
    this.src = parseSource(file, text ?? readFlowsheetFile(file));
    this.base = validateSource(this.src);
  }

  get atmosphere(): number {
    return this.base.model.thermo.atmosphere;
  }

  /** Resolves a path to a numeric scalar in the file; throws InputError naming what is wrong. */
  input(text: string): InputRef {
    const hit = this.refs.get(text);
    if (hit) return hit;
    const parts = text.split('.').map((p) => p.trim());
    if (parts.some((p) => p === '')) throw inputError(`input path \`${text}\` has an empty part`, 'write it as `unit.key` or `feeds.name.key`, e.g. `reactor.reactions.0.conversion`');
    const docPath: (string | number)[] = TOP.has(parts[0]) ? [] : ['units'];
    for (const p of parts) docPath.push(/^\d+$/.test(p) ? Number(p) : p);
    let node: unknown = this.src.doc.contents;
    let parent: unknown = null;
    const walked: (string | number)[] = [];
    for (const seg of docPath) {
      node = this.src.resolve(node);
      parent = node;
      let next: unknown;
      if (isMap(node)) {
        const pair = node.items.find((it) => isScalar(it.key) && String(it.key.value) === String(seg));
        if (!pair) {
          const keys = node.items.map((it) => (isScalar(it.key) ? String(it.key.value) : '')).filter(Boolean);
          const where = walked.length ? `\`${walked.join('.')}\`` : 'the top of the file';
          throw inputError(`input path \`${text}\`: there is no \`${seg}\` in ${where}`, didYouMean(String(seg), keys) ?? `the keys there are: ${keys.join(', ')}`);
        }
        next = pair.value;
      } else if (isSeq(node) && typeof seg === 'number') {
        if (seg >= node.items.length) throw inputError(`input path \`${text}\`: \`${walked.join('.')}\` has ${node.items.length} items (numbered from 0)`);
        next = node.items[seg];
      } else {
        throw inputError(`input path \`${text}\`: \`${walked.join('.')}\` has no parts`, 'an input path ends at a number or a value with a unit');
      }
      walked.push(seg);
      node = next;
    }
    node = this.src.resolve(node);
    if (!isScalar(node)) throw inputError(`input path \`${text}\` leads to a ${isMap(node) ? 'mapping' : 'list'}, not a value`, 'name one value, e.g. `feeds.hydrogen.meter.flow`');
    const v = node.value;
    let ref: InputRef;
    if (typeof v === 'number') {
      ref = { text, docPath, node, fileUnit: '', baseValue: v, original: v };
    } else if (v === 'rest') {
      ref = restInput(text, docPath, node, parent);
    } else if (typeof v === 'string') {
      let q;
      try {
        q = parseQuantity(v, DIMENSIONS, { atmosphere: this.atmosphere, standards: this.base.model.thermo.standards });
      } catch {
        throw inputError(`input path \`${text}\` leads to \`${v}\`, which is not a number or a value with a unit`, v === 'rest' ? 'give the other outlet `rest` and vary this one as a fraction' : undefined);
      }
      const unit = v.trim().replace(/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*/, '');
      ref = { text, docPath, node, fileUnit: unit, dimension: q.dimension, baseValue: q.value, original: v };
    } else {
      throw inputError(`input path \`${text}\` leads to \`${String(v)}\`, not a number`);
    }
    this.refs.set(text, ref);
    return ref;
  }

  /**
   * Sets inputs and validates. A value with a unit is written with that unit; without one, in
   * the unit the file uses. Throws InputError when the values make the file invalid.
   */
  model(values: readonly { ref: InputRef; value: number; unit?: string }[]): LoadedFile {
    for (const { ref, value, unit } of values) {
      if (ref.complement) {
        if (unit) throw inputError(`\`${ref.text}\` is a fraction; it takes no unit (\`${unit}\` given)`);
        ref.complement.node.value = 1 - value;
      } else if (ref.dimension === undefined) {
        if (unit) throw inputError(`\`${ref.text}\` is a plain number in the file; it takes no unit (\`${unit}\` given)`);
        ref.node.value = value;
      } else {
        const u = unit ?? ref.fileUnit;
        ref.node.value = `${formatNumber(value)} ${u}`;
      }
    }
    try {
      return validateSource(this.src, new DiagnosticBag());
    } finally {
      for (const { ref } of values) {
        ref.node.value = ref.original;
        if (ref.complement) ref.complement.node.value = ref.complement.original;
      }
    }
  }

  /** Checks a unit against an input's dimension. */
  checkUnit(ref: InputRef, unit: string): void {
    if (ref.dimension === undefined) {
      throw inputError(`\`${ref.text}\` is a plain number in the file; it takes no unit (\`${unit}\` given)`);
    }
    try {
      parseQuantity(`1 ${unit}`, ref.dimension, { atmosphere: this.atmosphere, standards: this.base.model.thermo.standards });
    } catch (e) {
      if (e instanceof UnitError) throw inputError(`the unit of \`${ref.text}\`: ${e.message}`, e.help);
      throw e;
    }
  }

  /** SI value of `value unit` for an input. */
  toSI(ref: InputRef, value: number, unit?: string): number {
    if (ref.dimension === undefined) return value;
    return parseQuantity(`${formatNumber(value)} ${unit ?? ref.fileUnit}`, ref.dimension, { atmosphere: this.atmosphere, standards: this.base.model.thermo.standards }).value;
  }
}

/** Full precision, no exponent surprises for YAML or the unit parser. */
export function formatNumber(v: number): string {
  return String(v);
}

function inputError(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}
