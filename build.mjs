// Bundles the CLI and the library with esbuild. A bundle keeps the cold start of
// `loopclose` short: each command reads only its own modules, and mathjs (its unit machinery
// alone) is read only when a unit outside the built-in table is parsed.
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const CODE_FILE = 'cli-code.cjs';

// CommonJS dependencies (commander) call require(); give the ESM bundle one.
const banner = { js: "import { createRequire as __loopcloseRequire } from 'node:module'; const require = __loopcloseRequire(import.meta.url);" };
const common = { bundle: true, platform: 'node', format: 'esm', target: 'node20', sourcemap: true, logLevel: 'warning', banner };
mkdirSync('dist', { recursive: true });
// Files of earlier layouts of the CLI that this build no longer makes.
for (const f of readdirSync('dist', { withFileTypes: true })) {
  if (f.isFile() && /^cli-.+\.mjs(\.map)?$/.test(f.name)) rmSync(join('dist', f.name));
}

// The CLI: dist/cli-code.cjs is the command line (src/cli/main.ts and everything it reaches,
// each command's modules initialised only when it runs), as CommonJS so that dist/cli.mjs
// (src/cli/start.ts) can hand V8 a code cache with it. Code in it finds the worker scripts and
// mathjs beside itself (import.meta.url is the bundle's own URL). `import('./pictures.js')` goes
// to the separate dist/pictures.mjs through the loader's import().
const picturesApart = {
  name: 'pictures-apart',
  setup(b) {
    b.onResolve({ filter: /^\.\/pictures\.js$/ }, () => ({ path: 'pictures', namespace: 'pictures-apart' }));
    b.onLoad({ filter: /.*/, namespace: 'pictures-apart' }, () => ({
      contents: "const load = () => globalThis[Symbol.for('loopclose.import')]('./pictures.mjs');\n" +
        'export const report = async (...a) => (await load()).report(...a);\nexport const plot = async (...a) => (await load()).plot(...a);\n',
      loader: 'js',
    }));
  },
};
await build({
  bundle: true, platform: 'node', format: 'cjs', target: 'node20', sourcemap: true, logLevel: 'warning',
  entryPoints: ['src/cli/main.ts'], outfile: `dist/${CODE_FILE}`, plugins: [picturesApart],
  define: { 'import.meta.url': '__loopcloseUrl' },
  banner: { js: "var __loopcloseUrl = require('node:url').pathToFileURL(__filename).href;" },
});
await build({ ...common, entryPoints: ['src/cli/start.ts'], outfile: 'dist/cli.mjs', banner: undefined });
// `report` and `plot` (src/cli/pictures.ts) are a bundle of their own, loaded by the CLI with
// import() only when those commands run: `solve` and `meter` read dist/cli.mjs alone, as fast
// as without them. elkjs and vega are split further into dist/chunks/, each read only by the
// command that draws with it.
await build({
  ...common, entryPoints: { pictures: 'src/cli/pictures.ts' }, outdir: 'dist', splitting: true,
  chunkNames: 'chunks/[name]-[hash]', outExtension: { '.js': '.mjs' },
});
// The library is bundled with its dependencies as well: importing mathjs as a package loads its
// whole function set (about a second), where the bundle keeps only the unit machinery.
await build({ ...common, entryPoints: ['src/index.ts'], outfile: 'dist/index.mjs' });
// mathjs's unit machinery alone, as CommonJS that src/units/mathjs-load.ts reads with require()
// the first time a unit outside the built-in table is parsed (most runs never read it).
await build({
  stdin: { contents: "export { create, unitDependencies } from 'mathjs';", resolveDir: '.', loader: 'js', sourcefile: 'units-mathjs.js' },
  bundle: true, platform: 'node', format: 'cjs', target: 'node20', sourcemap: true, logLevel: 'warning', outfile: 'dist/units-mathjs.cjs',
});
// The worker thread of `loopclose sweep --jobs N`, loaded from next to dist/cli.mjs.
await build({ ...common, entryPoints: ['src/study/worker.ts'], outfile: 'dist/worker.mjs' });
// The worker thread of `loopclose reconcile --readings F.csv --jobs N`, loaded from next to dist/cli.mjs.
await build({ ...common, entryPoints: ['src/plant/worker.ts'], outfile: 'dist/plant-worker.mjs' });
// The code cache: `loopclose solve` and `meter` on a demo, and a short sweep, run once in a fresh
// process whose compiled code is then kept (dist/cli-code.cjs.cache). Without it the CLI works the
// same, only its start is slower.
rmSync(`dist/${CODE_FILE}.cache`, { force: true });
{
  const scratch = mkdtempSync(join(tmpdir(), 'loopclose-build-'));
  const demo = resolve('flowsheets', 'methanol-pilot.yaml');
  const runs = [
    ['solve', demo], ['meter', demo],
    ['sweep', demo, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:3', '--report', 'loop.recycle-ratio', '--out', join(scratch, 'sweep.csv')],
  ];
  const train = `const cli = await import(${JSON.stringify(pathToFileURL(resolve('dist', 'cli.mjs')).href)});
for (const args of ${JSON.stringify(runs)}) await cli.main([process.argv[0], 'loopclose', ...args]);
process.exitCode = 0;
cli.saveCodeCache();`;
  const r = spawnSync(process.execPath, ['--input-type=module', '-e', train], { stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8' });
  rmSync(scratch, { recursive: true, force: true });
  if (r.status !== 0 || !existsSync(`dist/${CODE_FILE}.cache`)) {
    process.stderr.write(`build: no code cache for the CLI (it works without one, with a slower start): ${r.stderr || `exit ${r.status}`}\n`);
  }
}
