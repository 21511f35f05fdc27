/**
 * Shards: a deterministic share of a sweep's blocks for one job of a batch (array jobs on
 * a cluster). Shard i of N takes the blocks whose number (from 0, in walk order) modulo N is
 * i - 1. Blocks, not points, are shared out, so every block is solved exactly as in a full run
 * (same cold start, same continuation) and merged shards equal the full run byte for byte.
 */
import { InputError } from '../diagnostics.js';

export interface Shard {
  index: number;
  count: number;
}

function fail(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}

/** `i/N` for --shard. */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const index = m ? Number(m[1]) : Number.NaN;
  const count = m ? Number(m[2]) : Number.NaN;
  if (!m || count < 1 || index < 1 || index > count) throw fail(`--shard \`${text}\` is not i/N with 1 <= i <= N`, 'e.g. --shard 3/8 runs the third of eight shares');
  return { index, count };
}

/** The blocks of shard i of N: those whose block number (from 0) modulo N is i - 1. */
export function shardBlocks<T>(blocks: readonly T[], shard: Shard): T[] {
  return blocks.filter((_, b) => b % shard.count === shard.index - 1);
}

/**
 * `--shard auto`: the share from the array-job variables a batch scheduler sets for each task
 * (variable names as the schedulers document them; from memory):
 *   Slurm:          SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_MIN, SLURM_ARRAY_TASK_STEP (default 1),
 *                   SLURM_ARRAY_TASK_COUNT   (sbatch --array=1-8, or 0-7, or 1-15:2)
 *   Grid Engine:    SGE_TASK_ID, SGE_TASK_FIRST, SGE_TASK_LAST, SGE_TASK_STEPSIZE (qsub -t 1-8)
 * The task's place in its array, counted from 1, is the shard's index; the array's size is the
 * count. Refused, naming the variables, when none is set or an array is not evenly spaced.
 */
export function shardFromEnvironment(env: NodeJS.ProcessEnv = process.env): Shard {
  const int = (v: string | undefined) => (v !== undefined && /^\s*-?\d+\s*$/.test(v) ? Number(v) : undefined);
  const place = (id: number, first: number, step: number, count: number, names: string): Shard => {
    if (!(step >= 1) || (id - first) % step !== 0 || id < first) throw fail(`--shard auto: the task id ${id} is not on the array's steps (${names})`, 'use an evenly spaced array (e.g. --array=1-8) or give --shard i/N');
    const index = (id - first) / step + 1;
    if (!(count >= 1) || index > count) throw fail(`--shard auto: task ${index} of an array of ${count} (${names}) is not a share`, 'give --shard i/N');
    return { index, count };
  };
  const sid = int(env.SLURM_ARRAY_TASK_ID);
  if (sid !== undefined) {
    const count = int(env.SLURM_ARRAY_TASK_COUNT);
    const min = int(env.SLURM_ARRAY_TASK_MIN);
    if (count === undefined || min === undefined) throw fail('--shard auto: SLURM_ARRAY_TASK_ID is set but not SLURM_ARRAY_TASK_COUNT and SLURM_ARRAY_TASK_MIN', 'run the sweep as an array job (sbatch --array=1-8) or give --shard i/N');
    return place(sid, min, int(env.SLURM_ARRAY_TASK_STEP) ?? 1, count, 'Slurm');
  }
  const gid = int(env.SGE_TASK_ID);
  if (gid !== undefined) {
    const first = int(env.SGE_TASK_FIRST);
    const last = int(env.SGE_TASK_LAST);
    const step = int(env.SGE_TASK_STEPSIZE) ?? 1;
    if (first === undefined || last === undefined) throw fail('--shard auto: SGE_TASK_ID is set but not SGE_TASK_FIRST and SGE_TASK_LAST', 'run the sweep as an array job (qsub -t 1-8) or give --shard i/N');
    return place(gid, first, step, Math.floor((last - first) / step) + 1, 'Grid Engine');
  }
  throw fail('--shard auto: no array-job task is set in the environment (SLURM_ARRAY_TASK_ID or SGE_TASK_ID)', 'run the sweep as a task of an array job, or give --shard i/N');
}
