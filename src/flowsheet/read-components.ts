/**
 * The `components:` section: built-in rows by id (or name), rows of the file's own, and
 * overrides of built-in constants.
 */
import { didYouMean } from '../diagnostics.js';
import { componentIds, findComponent } from '../thermo/components.js';
import { molarMass, parseFormula } from '../thermo/formula.js';
import type { ComponentData } from '../thermo/types.js';
import type { Entry, Reader } from './source.js';
import { quantityAt } from './yaml-fields.js';

export function readComponent(r: Reader, e: Entry): ComponentData | undefined {
  const lib = findComponent(e.key);
  const v = e.value;
  const isEmpty = v === null || (r.isScalar(v) && (v.value === null || v.value === '' || v.value === 'library')) || (r.isMap(v) && v.items.length === 0);
  if (isEmpty) {
    if (r.isScalar(v) && typeof v.value === 'string' && v.value !== '' && v.value !== 'library') {
      r.bag.error(`component \`${e.key}\`: \`${v.value}\` is not understood`, r.at(v), 'write `{}` or `library` for the built-in data, or a body with Tc, Pc, omega and formula');
      return undefined;
    }
    if (!lib) {
      r.bag.error(`unknown component \`${e.key}\``, r.at(e.keyNode),
        didYouMean(e.key, componentIds()) ?? 'give its constants inline: `{ Tc: 408.1 K, Pc: 36.5 bar, omega: 0.183, formula: C4H10 }`');
      return undefined;
    }
    // Molar mass from the formula and the standard atomic weights, so that the mass balance
    // closes exactly wherever the element balance does (table values agree to 0.05 %).
    return { ...lib, id: e.key, MW: molarMass(lib.formula) };
  }
  if (r.isScalar(v)) {
    r.bag.error(`component \`${e.key}\` must be \`{}\`, \`library\` or a mapping of constants`, r.at(v));
    return undefined;
  }
  const f = r.entries(v, `component \`${e.key}\``, e.keyNode);
  if (!f) return undefined;
  r.checkKeys(f, ['Tc', 'Pc', 'omega', 'MW', 'formula', 'name'], `component \`${e.key}\``);
  const ctx = { atmosphere: 101325 };
  // One message names every key a component of the file's own lacks.
  const missing = lib ? [] : ['Tc', 'Pc', 'omega', 'formula'].filter((k) => !r.find(f, k) && !r.strayNear(f, k));
  if (missing.length) {
    const example: Record<string, string> = { Tc: '`Tc: 408.1 K`', Pc: '`Pc: 36.5 bar`', omega: '`omega: 0.183` (the acentric factor)', formula: '`formula: C4H10`' };
    r.bag.error(`component \`${e.key}\` is not in the built-in table and has no ${missing.map((k) => `\`${k}\``).join(', ')}`, r.at(e.keyNode),
      `add ${missing.map((k) => example[k]).join(', ')}`);
  }
  const ok = missing.length === 0;
  const get = (k: string) => r.find(f, k);
  const Tc = get('Tc') ? quantityAt(r, get('Tc')!.value, 'temperature', `\`Tc\` of \`${e.key}\``, { above: 0, example: '408.1 K' }, ctx) : lib?.Tc;
  const Pc = get('Pc') ? quantityAt(r, get('Pc')!.value, 'pressure', `\`Pc\` of \`${e.key}\``, { above: 0, example: '36.5 bar' }, ctx) : lib?.Pc;
  const omega = get('omega') ? r.number(get('omega')!.value, `\`omega\` of \`${e.key}\``, '0.183') : lib?.omega;
  if (omega !== undefined && (omega < -1 || omega > 2)) r.bag.error(`\`omega\` of \`${e.key}\` is ${omega}; acentric factors lie between about -0.4 and 1.5`, r.at(get('omega')!.value));
  let formula = get('formula') ? r.string(get('formula')!.value, `\`formula\` of \`${e.key}\``, 'C4H10') : lib?.formula;
  if (formula !== undefined) {
    try {
      parseFormula(formula);
    } catch (err) {
      r.bag.error(`\`formula\` of \`${e.key}\`: ${(err as Error).message}`, r.at(get('formula')?.value ?? e.keyNode), 'write element symbols with counts, e.g. `C4H10` or `CH3OH`');
      formula = undefined;
    }
  }
  let MW = get('MW') ? quantityAt(r, get('MW')!.value, 'molarMass', `\`MW\` of \`${e.key}\``, { above: 0, example: '58.12 g/mol' }, ctx) : undefined;
  if (MW === undefined && !get('MW') && formula) MW = molarMass(formula);
  const name = get('name') ? r.string(get('name')!.value, `\`name\` of \`${e.key}\``) : lib?.name ?? e.key;
  if (!ok || Tc === undefined || Pc === undefined || omega === undefined || formula === undefined || MW === undefined) return undefined;
  return {
    id: e.key, name: name ?? e.key, formula, MW, Tc, Pc, omega,
    source: lib ? `${lib.source}; overridden in ${r.src.path}` : `given in ${r.src.path}`,
  };
}

