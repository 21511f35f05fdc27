// Bundles the CLI and the library with esbuild. A bundle keeps the cold start of
// `loopclose` short: each command reads only its own modules, and mathjs (its unit machinery
// alone) is read only when a unit outside the built-in table is parsed.
import { build } from 'esbuild';
import { readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';

// CommonJS dependencies (commander) call require(); give the ESM bundle one.
const banner = { js: "import { createRequire as __loopcloseRequire } from 'node:module'; const require = __loopcloseRequire(import.meta.url);" };
/** In the CLI bundle, `import('./pictures.js')` stays an import of the separate dist/pictures.mjs. */
const picturesApart = {
  name: 'pictures-apart',
  setup(b) {
    b.onResolve({ filter: /^\.\/pictures\.js$/ }, () => ({ path: './pictures.mjs', external: true }));
  },
};
const common = { bundle: true, platform: 'node', format: 'esm', target: 'node20', sourcemap: true, logLevel: 'warning', banner };
// The CLI is split: dist/cli.mjs holds the command line itself (commander and the options of
// every command), and each command's modules are read with import() only when it runs, from
// chunks beside it (dist/cli-*.mjs). The chunks stay in dist/ itself, not a subfolder, because
// code in them finds the worker scripts next to itself (new URL('./worker.mjs', import.meta.url)).
for (const f of readdirSync('dist', { withFileTypes: true })) {
  if (f.isFile() && /^cli-.+\.mjs(\.map)?$/.test(f.name)) rmSync(join('dist', f.name));
}
await build({
  ...common, entryPoints: { cli: 'src/cli/main.ts' }, outdir: 'dist', splitting: true,
  chunkNames: 'cli-[name]-[hash]', outExtension: { '.js': '.mjs' }, plugins: [picturesApart],
});
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

