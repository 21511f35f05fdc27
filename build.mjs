// Bundles the CLI and the library with esbuild. A bundle keeps the cold start of
// `loopclose` short: only the parts of mathjs that the unit parser uses are loaded.
import { build } from 'esbuild';

// CommonJS dependencies (commander) call require(); give the ESM bundle one.
const banner = { js: "import { createRequire as __loopcloseRequire } from 'node:module'; const require = __loopcloseRequire(import.meta.url);" };
const common = { bundle: true, platform: 'node', format: 'esm', target: 'node20', sourcemap: true, logLevel: 'warning', banner };
// The CLI is split: what `report` and `plot` load with import() (the drawing with elkjs, the
// plots with vega) goes into chunks of its own under dist/chunks/, read only when those
// commands run, so that `solve` and `meter` start as fast as without them.
await build({ ...common, entryPoints: { cli: 'src/cli/main.ts' }, outdir: 'dist', splitting: true, chunkNames: 'chunks/[name]-[hash]', outExtension: { '.js': '.mjs' } });
// The library is bundled with its dependencies as well: importing mathjs as a package loads its
// whole function set (about a second), where the bundle keeps only the unit machinery.
await build({ ...common, entryPoints: ['src/index.ts'], outfile: 'dist/index.mjs' });
// The worker thread of `loopclose sweep --jobs N`, loaded from next to dist/cli.mjs.
await build({ ...common, entryPoints: ['src/study/worker.ts'], outfile: 'dist/worker.mjs' });

