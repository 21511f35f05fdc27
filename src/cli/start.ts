/**
 * dist/cli.mjs: loads the command line (dist/cli-code.cjs, the bundle of src/cli/main.ts) with
 * V8's code cache, so that a run does not parse and compile again what the last build compiled.
 *
 * Most of a short run (`loopclose solve` on a small file) is V8 reading the program: the bundle's
 * source parsed, then every function compiled to bytecode the first time it is called. build.mjs
 * runs `loopclose solve` on a demo once and keeps what V8 compiled (dist/cli-code.cjs.cache); a
 * run hands it back to V8 with the source. V8 checks that the cache belongs to this source, this
 * V8 and these flags; otherwise it ignores the cache and compiles as usual (the same program,
 * only slower), so a missing or stale cache never changes what the command does.
 *
 * The bundle is CommonJS because Node 20 takes a code cache only for scripts (vm.Script), not
 * for ES modules.
 */
import { readFileSync, writeFileSync, renameSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Script } from 'node:vm';

export const CODE_FILE = 'cli-code.cjs';

interface CliModule {
  main(argv: string[]): Promise<void>;
  useColor(stream: NodeJS.WriteStream): boolean;
  commandName(argv: readonly string[]): string | undefined;
}

const file = fileURLToPath(new URL(`./${CODE_FILE}`, import.meta.url));
const cacheFile = `${file}.cache`;
let cachedData: Buffer | undefined;
try {
  cachedData = readFileSync(cacheFile);
} catch {
  /* no cache: V8 compiles the source */
}
// The bundle reaches modules outside itself (dist/pictures.mjs) through import(), which a
// vm.Script cannot call without an experimental option: it asks this module to import them.
(globalThis as Record<symbol, unknown>)[Symbol.for('loopclose.import')] = (specifier: string) => import(new URL(specifier, import.meta.url).href);
const script = new Script(`(function (exports, require, module, __filename, __dirname) {${readFileSync(file, 'utf8')}\n})`, { filename: file, cachedData });

/** True when V8 took the code cache (test hook: LOOPCLOSE_CODE_CACHE=report prints it to standard error at exit). */
export const codeCacheAccepted = cachedData !== undefined && !script.cachedDataRejected;
if (process.env.LOOPCLOSE_CODE_CACHE === 'report') {
  process.on('exit', () => process.stderr.write(`loopclose code cache: ${cachedData === undefined ? 'none' : codeCacheAccepted ? 'accepted' : 'rejected'}\n`));
}

const mod = { exports: {} as CliModule };
(script.runInThisContext() as (e: object, r: NodeRequire, m: object, f: string, d: string) => void)(mod.exports, createRequire(file), mod, file, dirname(file));

export const main = mod.exports.main;
export const useColor = mod.exports.useColor;
export const commandName = mod.exports.commandName;

/**
 * Writes what V8 has compiled so far (the bundle's top level and every function called) as the
 * code cache beside the bundle, whole or not at all. build.mjs calls it after a run of `solve`.
 */
export function saveCodeCache(): number {
  const data = script.createCachedData();
  const tmp = `${cacheFile}.${process.pid}.tmp`;
  writeFileSync(tmp, data);
  renameSync(tmp, cacheFile);
  return data.length;
}
