/**
 * mathjs's unit machinery, read from disk the first time a unit outside the built-in table
 * (table.ts) is parsed. A parse is synchronous, so mathjs is loaded with require(): from the
 * bundle's own copy (dist/units-mathjs.cjs, made by build.mjs: `create` and `unitDependencies`
 * alone) when this code runs from dist/, else from the mathjs package (the sources under test).
 * A run whose units are all in the table never reads mathjs at all, which keeps the start of
 * `loopclose solve` and `meter` short.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import type { create, unitDependencies } from 'mathjs';

export interface MathjsUnits {
  create: typeof create;
  unitDependencies: typeof unitDependencies;
}

/** Name of the bundle's copy of mathjs, beside the bundles in dist/. */
export const MATHJS_BUNDLE = 'units-mathjs.cjs';

let loaded: MathjsUnits | undefined;

/** mathjs's `create` and `unitDependencies`, loaded on the first call. */
export function loadMathjs(): MathjsUnits {
  if (loaded) return loaded;
  const require = createRequire(import.meta.url);
  // dist/*.mjs find the copy beside them; code split into dist/chunks/ one level up.
  const built = [new URL(`./${MATHJS_BUNDLE}`, import.meta.url), new URL(`../${MATHJS_BUNDLE}`, import.meta.url)].find((u) => existsSync(u));
  loaded = require(built ? fileURLToPath(built) : 'mathjs') as MathjsUnits;
  return loaded;
}
