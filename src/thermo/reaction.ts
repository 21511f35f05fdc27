/**
 * Chemical equations: "CO2 + 3 H2 -> CH3OH + H2O" -> stoichiometric coefficients over the
 * file's components (negative for reactants), with an element balance check.
 */

export interface Stoichiometry {
  /** Coefficients, length n: negative for reactants, positive for products. */
  nu: Float64Array;
  /** Components that appear, in the order written. */
  species: number[];
}

export class EquationError extends Error {
  constructor(message: string, readonly help?: string) {
    super(message);
    this.name = 'EquationError';
  }
}

const ARROW = /\s*(?:->|=>|→|=)\s*/;

/** Parses an equation over the given component ids. Throws EquationError. */
export function parseEquation(text: string, ids: readonly string[]): Stoichiometry {
  const parts = text.split(ARROW);
  if (parts.length !== 2 || parts[0].trim() === '' || parts[1].trim() === '') {
    throw new EquationError(`equation \`${text}\` must have reactants, an arrow \`->\` and products`, 'for example `CO2 + 3 H2 -> CH3OH + H2O`');
  }
  const index = new Map(ids.map((id, i) => [id, i]));
  const nu = new Float64Array(ids.length);
  const species: number[] = [];
  parts.forEach((side, s) => {
    const sign = s === 0 ? -1 : 1;
    for (const raw of side.split(/\s+\+\s+|\s*\+\s+|\s+\+\s*/)) {
      const term = raw.trim();
      if (term === '') throw new EquationError(`equation \`${text}\` has an empty term`, 'write terms as `3 H2`, separated by ` + `');
      let coef = 1;
      let id = term;
      const m = /^(\d+(?:\.\d+)?|\d*\.\d+)\s*(.+)$/.exec(term);
      if (m && !index.has(term)) {
        coef = Number(m[1]);
        id = m[2].trim();
      }
      const i = index.get(id);
      if (i === undefined) {
        throw new EquationError(`\`${id}\` in equation \`${text}\` is not a component of this file`, `the components are: ${ids.join(', ')}`);
      }
      if (!(coef > 0)) throw new EquationError(`coefficient of \`${id}\` in \`${text}\` must be positive`);
      if (!species.includes(i)) species.push(i);
      nu[i] += sign * coef;
    }
  });
  return { nu, species };
}

/** Element imbalance of a reaction: element -> (products - reactants) in atoms; empty when balanced. */
export function elementImbalance(nu: ArrayLike<number>, elements: readonly Record<string, number>[], tol = 1e-9): Record<string, number> {
  const sums: Record<string, number> = {};
  for (let i = 0; i < nu.length; i++) {
    if (nu[i] === 0) continue;
    for (const [el, k] of Object.entries(elements[i])) sums[el] = (sums[el] ?? 0) + nu[i] * k;
  }
  const out: Record<string, number> = {};
  for (const [el, v] of Object.entries(sums)) if (Math.abs(v) > tol) out[el] = v;
  return out;
}
