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
