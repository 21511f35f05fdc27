/**
 * A study's edit of one outlet's fraction of a splitter (or of a separator written with whole
 * fractions). The fractions of the outlets add up to 1, so setting one alone is not the whole
 * story:
 *  - two outlets: the one set takes the value and the other takes the rest (whichever of the
 *    two the file wrote as `rest`);
 *  - three or more with one written `rest`: the one set takes the value, `rest` takes what the
 *    others leave (an outlet written `rest` cannot be set itself: it is what is left);
 *  - three or more and none written `rest`: refused, naming an outlet to write `rest`.
 */
import { isSettingMap, setIn, type SettingMap } from '../flowsheet/settings.js';
import type { ParameterEdit } from './types.js';

export function editOutletFraction(unit: string, settings: SettingMap, key: readonly string[], value: number): ParameterEdit {
  const outs = settings.get(key[0]);
  if (key.length !== 2 || !isSettingMap(outs)) return setIn(settings, key, value);
  const name = key[1];
  const others = [...outs.keys()].filter((o) => o !== name);
  const current = outs.get(name);
  if (typeof current !== 'number' && current !== 'rest') return setIn(settings, key, value);
  if (others.some((o) => typeof outs.get(o) !== 'number' && outs.get(o) !== 'rest')) return setIn(settings, key, value);
  if (others.length === 1) {
    const both = new Map(outs);
    both.set(name, value);
    both.set(others[0], 'rest');
    return setIn(settings, [key[0]], both);
  }
  if (current === 'rest') {
    return {
      error: `\`${unit}.${key.join('.')}\` is written \`rest\`: it takes what the other ${others.length} outlets leave`,
      help: `vary one of the outlets written as a number (${others.map((o) => `\`${unit}.${key[0]}.${o}\``).join(', ')}), or write \`rest\` for another outlet and give \`${name}\` a number`,
    };
  }
  if (!others.some((o) => outs.get(o) === 'rest')) {
    return {
      error: `\`${unit}.${key.join('.')}\` cannot change alone: the ${others.length + 1} outlets of \`${unit}\` must add up to 1 and none is written \`rest\``,
      help: `write \`rest\` for one of the other outlets (${others.map((o) => `\`${o}\``).join(' or ')}), e.g. \`${others[0]}: rest\`, so that it takes the change`,
    };
  }
  return setIn(settings, key, value);
}
