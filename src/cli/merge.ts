/** `loopclose merge SHARD-FILE... [--out FILE]`: the shards of a sweep joined into the full run's output. */
import type { Command } from 'commander';
import { InputError, type Diagnostic } from '../diagnostics.js';
import { mergeShards, type ShardFile } from '../study/merge.js';
import { EXIT } from './exit.js';
import { isStandardOutput, writeOutput } from './io.js';
import { readFileSync } from 'node:fs';

export function registerMerge(program: Command, setCode: (code: number) => void): void {
  program
    .command('merge')
    .description('join the outputs of the shards of a sweep (--shard i/N) into the output of the full run; checks that no point is missing or doubled')
    .argument('<files...>', 'the output file of every shard')
    .option('--out <file>', 'write the merged output to a file (written whole, or not at all)')
    .option('--overwrite', 'replace --out when it exists')
    .action(async (paths: string[], o: { out?: string; overwrite?: boolean }) => {
      const files: ShardFile[] = [];
      const problems: Diagnostic[] = [];
      for (const path of paths) {
        try {
          files.push({ path, text: readFileSync(path, 'utf8') });
        } catch (e) {
          const code = (e as NodeJS.ErrnoException).code;
          problems.push({ severity: 'error', message: `cannot read \`${path}\`${code === 'ENOENT' ? ': no such file' : code === 'EISDIR' ? ': it is a folder' : code ? ` (${code})` : ''}`, help: 'check the path' });
        }
      }
      if (problems.length) throw new InputError(problems);
      const text = mergeShards(files);
      if (o.out && !isStandardOutput(o.out)) writeOutput(o.out, text, { overwrite: o.overwrite });
      else await new Promise<void>((resolve) => process.stdout.write(text, () => resolve()));
      setCode(EXIT.ok);
    });
}
