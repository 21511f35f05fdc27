// Bundles the CLI and the library with esbuild. A bundle keeps the cold start of
// `loopclose` short: only the parts of mathjs that the unit parser uses are loaded.
import { build } from 'esbuild';

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
await build({ ...common, entryPoints: ['src/cli/main.ts'], outfile: 'dist/cli.mjs', plugins: [picturesApart] });
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
// The worker thread of `loopclose sweep --jobs N`, loaded from next to dist/cli.mjs.
await build({ ...common, entryPoints: ['src/study/worker.ts'], outfile: 'dist/worker.mjs' });
// The worker thread of `loopclose reconcile --readings F.csv --jobs N`, loaded from next to dist/cli.mjs.
await build({ ...common, entryPoints: ['src/plant/worker.ts'], outfile: 'dist/plant-worker.mjs' });

