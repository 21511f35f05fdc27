/** The unit blocks a file may use: adding a block is one file and one line here. */
import type { BlockDef } from './types.js';
import { mixer } from './mixer.js';
import { reactor } from './reactor.js';
import { condenser, flash } from './condenser.js';
import { splitter } from './splitter.js';
import { separator } from './separator.js';
import { feed } from './feed.js';
import { heater, cooler } from './heater.js';
import { compressor } from './compressor.js';
import { valve } from './valve.js';

export const BLOCKS: Readonly<Record<string, BlockDef<any>>> = {
  mixer,
  reactor,
  condenser,
  flash,
  splitter,
  separator,
  heater,
  cooler,
  compressor,
  valve,
};

/** The block that reads and converts every entry of `feeds:`. */
export const FEED = feed;

export function blockTypes(): string[] {
  return Object.keys(BLOCKS);
}

/** The block of a unit or feed spec. */
export function blockOf(spec: { type: string }): BlockDef<any> {
  return spec.type === FEED.type ? FEED : BLOCKS[spec.type];
}
