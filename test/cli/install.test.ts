/**
 * loopclose outside its own folder: the packed tarball installed into a fresh project (offline:
 * the package has no runtime dependencies, the bundle holds them), the command run there, and
 * the library imported and type-checked against the shipped declarations.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/cli.js';

describe('installed from a packed tarball, used from another folder', () => {
  it('runs `loopclose solve` and a typed library call in a new project', () => {
    const dir = mkdtempSync(join(tmpdir(), 'loopclose-install-'));
    const npm = process.platform === 'win32' ? 'npm.cmd' : 'npm';
    execFileSync(npm, ['pack', '--ignore-scripts', '--silent', '--pack-destination', dir], { cwd: ROOT, stdio: 'pipe' });
    const tgz = readdirSync(dir).find((f) => f.endsWith('.tgz'))!;
    expect(tgz).toMatch(/^loopclose-.*\.tgz$/);
    const app = join(dir, 'app');
    execFileSync('mkdir', [app]);
    writeFileSync(join(app, 'package.json'), JSON.stringify({ name: 'plant-study', version: '1.0.0', type: 'module', private: true }));
    execFileSync(npm, ['install', '--offline', '--no-audit', '--no-fund', '--silent', join(dir, tgz)], { cwd: app, stdio: 'pipe' });
    copyFileSync(join(ROOT, 'flowsheets', 'ammonia-loop.yaml'), join(app, 'loop.yaml'));
    const bin = join(app, 'node_modules', '.bin', 'loopclose');
    const run = spawnSync(bin, ['solve', 'loop.yaml', '--json'], { cwd: app, encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    expect(JSON.parse(run.stdout).status).toBe('converged');
    // The library, with its declarations.
    writeFileSync(join(app, 'study.ts'), `import { loadFlowsheet, parameter, withValues, solveFlowsheet, type FlowsheetResult } from 'loopclose';
const { model } = loadFlowsheet('loop.yaml');
const p = parameter(model, 'purge-split.out.purge');
export const r: FlowsheetResult = solveFlowsheet(withValues(model, [{ parameter: p, value: 0.03 }]));
export const ratio: number = r.loop.recycleRatio;
`);
    writeFileSync(join(app, 'tsconfig.json'), JSON.stringify({ compilerOptions: { target: 'ES2022', module: 'NodeNext', moduleResolution: 'NodeNext', strict: true, noEmit: true, types: [], skipLibCheck: false, lib: ['ES2022'] }, files: ['study.ts'] }));
    const tsc = spawnSync(process.execPath, [join(ROOT, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', 'tsconfig.json'], { cwd: app, encoding: 'utf8' });
    expect(tsc.status, tsc.stdout + tsc.stderr).toBe(0);
    writeFileSync(join(app, 'study.mjs'), `import { loadFlowsheet, parameter, withValues, solveFlowsheet } from 'loopclose';
const { model } = loadFlowsheet('loop.yaml');
const r = solveFlowsheet(withValues(model, [{ parameter: parameter(model, 'purge-split.out.purge'), value: 0.03 }]));
console.log(r.status);
`);
    const lib = spawnSync(process.execPath, ['study.mjs'], { cwd: app, encoding: 'utf8' });
    expect(lib.status, lib.stderr).toBe(0);
    expect(lib.stdout.trim()).toBe('converged');
  });
});
