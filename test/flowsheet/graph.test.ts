import { describe, expect, it } from 'vitest';
import { FlowsheetGraphError, planFlowsheet } from '../../src/flowsheet/graph.js';
import type { GraphUnit, Plan } from '../../src/flowsheet/graph.js';

const unit = (name: string, inlets: string[], outlets: string[]): GraphUnit => ({ name, inlets, outlets });

/** Independent check: the streams between units without the tears form no cycle (DFS colouring). */
function acyclicWithout(units: readonly GraphUnit[], tears: readonly string[]): boolean {
  const taker = new Map<string, string>();
  for (const u of units) for (const s of u.inlets) taker.set(s, u.name);
  const next = new Map<string, string[]>();
  for (const u of units) {
    next.set(
      u.name,
      u.outlets.filter((s) => taker.has(s) && !tears.includes(s)).map((s) => taker.get(s) as string),
    );
  }
  const colour = new Map<string, number>();
  for (const start of units.map((u) => u.name)) {
    if (colour.get(start)) continue;
    const stack: [string, number][] = [[start, 0]];
    colour.set(start, 1);
    while (stack.length > 0) {
      const top = stack[stack.length - 1];
      const out = next.get(top[0]) as string[];
      if (top[1] < out.length) {
        const w = out[top[1]++];
        const c = colour.get(w) ?? 0;
        if (c === 1) return false;
        if (c === 0) {
          colour.set(w, 1);
          stack.push([w, 0]);
        }
      } else {
        colour.set(top[0], 2);
        stack.pop();
      }
    }
  }
  return true;
}

/** Independent check: every unit comes after the makers of its inlets, tears excepted. */
function orderRespects(units: readonly GraphUnit[], plan: Plan): boolean {
  const pos = new Map(plan.order.map((u, k) => [u, k]));
  const maker = new Map<string, string>();
  for (const u of units) for (const s of u.outlets) maker.set(s, u.name);
  if (plan.order.length !== units.length) return false;
  for (const u of units) {
    for (const s of u.inlets) {
      const m = maker.get(s);
      if (m === undefined || plan.tears.includes(s)) continue;
      if ((pos.get(m) as number) >= (pos.get(u.name) as number)) return false;
    }
  }
  return true;
}

describe('planFlowsheet: small flowsheets', () => {
  // feed -> mixer -> reactor -> condenser -> splitter -> recycle back to the mixer, purge out.
  const single = [
    unit('mix', ['feed', 'recycle'], ['s1']),
    unit('rx', ['s1'], ['s2']),
    unit('cond', ['s2'], ['gas', 'liquid']),
    unit('split', ['gas'], ['recycle', 'purge']),
  ];

  it('single loop: one tear, the first internal stream by name, and an order that follows it', () => {
    const plan = planFlowsheet(single);
    expect(plan.tears).toEqual(['gas']);
    expect(plan.order).toEqual(['split', 'mix', 'rx', 'cond']);
    expect(plan.loops).toEqual([['split', 'mix', 'rx', 'cond']]);
    expect(plan.loopTears).toEqual([['gas']]);
    expect(orderRespects(single, plan)).toBe(true);
  });

  it('single loop with the recycle as the given tear', () => {
    const plan = planFlowsheet(single, ['recycle']);
    expect(plan.tears).toEqual(['recycle']);
    expect(plan.addedTears).toEqual([]);
    expect(plan.order).toEqual(['mix', 'rx', 'cond', 'split']);
    expect(plan.notes).toEqual([]);
  });

  // Two interacting loops into the same mixer: a liquid recycle from a separator and a gas
  // recycle from the purge splitter. Both cycles share mix -> rx -> sep.
  const two = [
    unit('mix', ['feed', 'liqrec', 'gasrec'], ['s1']),
    unit('rx', ['s1'], ['s2']),
    unit('sep', ['s2'], ['liqrec', 'gas', 'prod']),
    unit('split', ['gas'], ['gasrec', 'purge']),
  ];

  it('two recycles into one mixer: a single shared stream tears both', () => {
    const plan = planFlowsheet(two);
    expect(plan.tears).toEqual(['s1']);
    expect(plan.loops).toHaveLength(1);
    expect(plan.loops[0].slice().sort()).toEqual(['mix', 'rx', 'sep', 'split']);
    expect(plan.order).toEqual(['rx', 'sep', 'split', 'mix']);
    expect(acyclicWithout(two, plan.tears)).toBe(true);
  });

  it('given tears that leave a cycle open get the fewest more, reported', () => {
    const plan = planFlowsheet(two, ['gasrec']);
    expect(plan.addedTears).toEqual(['liqrec']);
    expect(plan.tears.slice().sort()).toEqual(['gasrec', 'liqrec']);
    expect(plan.notes.join(' ')).toMatch(/added tear stream "liqrec"/);
    expect(acyclicWithout(two, plan.tears)).toBe(true);
    expect(orderRespects(two, plan)).toBe(true);
  });

  // Nested loops: an inner loop around each of two reactors, and an outer loop from the last
  // splitter back to the first mixer. The two inner cycles share no stream, so two tears are
  // needed; each can also lie on the outer cycle.
  const nested = [
    unit('m1', ['feed', 'r3', 'r1'], ['a1']),
    unit('x1', ['a1'], ['a2']),
    unit('s1', ['a2'], ['r1', 'b0']),
    unit('m2', ['b0', 'r2'], ['b1']),
    unit('x2', ['b1'], ['b2']),
    unit('s2', ['b2'], ['r2', 'c0']),
    unit('s3', ['c0'], ['r3', 'prod']),
  ];

  it('nested loops: the minimum of two tears, covering the outer loop too', () => {
    const plan = planFlowsheet(nested);
    expect(plan.tears).toHaveLength(2);
    expect(plan.tears).toEqual(['a1', 'b1']);
    expect(acyclicWithout(nested, plan.tears)).toBe(true);
    // No single stream breaks every cycle (brute force).
    const internal = nested.flatMap((u) => u.outlets).filter((s) => nested.some((u) => u.inlets.includes(s)));
    for (const s of internal) expect(acyclicWithout(nested, [s])).toBe(false);
    expect(orderRespects(nested, plan)).toBe(true);
    expect(plan.loops).toHaveLength(1);
    expect(plan.loops[0]).toHaveLength(7);
  });

  it('the greedy rule (forced by exactLimit 0) also breaks every cycle with two tears here', () => {
    const plan = planFlowsheet(nested, [], { exactLimit: 0 });
    expect(acyclicWithout(nested, plan.tears)).toBe(true);
    expect(plan.tears).toHaveLength(2);
    expect(plan.notes.join(' ')).toMatch(/greedy/);
  });

  it('a loop-free chain has no tears and keeps the flow order whatever the listing order', () => {
    const chain = [
      unit('c', ['s2'], ['s3']),
      unit('a', ['feed'], ['s1']),
      unit('d', ['s3'], ['prod']),
      unit('b', ['s1'], ['s2']),
    ];
    const plan = planFlowsheet(chain);
    expect(plan.tears).toEqual([]);
    expect(plan.loops).toEqual([]);
    expect(plan.order).toEqual(['a', 'b', 'c', 'd']);
  });

  it('a stream from a unit back into itself is a loop of one unit', () => {
    const plan = planFlowsheet([unit('a', ['feed'], ['x']), unit('b', ['x', 'self'], ['self', 'out'])]);
    expect(plan.tears).toEqual(['self']);
    expect(plan.loops).toEqual([['b']]);
    expect(plan.order).toEqual(['a', 'b']);
  });

  it('two separate loops in series are planned as two loops in flow order', () => {
    const units = [
      unit('m2', ['y', 'q'], ['z']),
      unit('u2', ['z'], ['q', 'out']),
      unit('m1', ['feed', 'p'], ['w']),
      unit('u1', ['w'], ['p', 'y']),
    ];
    const plan = planFlowsheet(units);
    expect(plan.loops).toEqual([['m1', 'u1'], ['m2', 'u2']]);
    expect(plan.loopTears).toEqual([['p'], ['q']]);
    expect(plan.tears).toEqual(['p', 'q']);
    expect(orderRespects(units, plan)).toBe(true);
  });

  it('is deterministic', () => {
    expect(planFlowsheet(nested)).toEqual(planFlowsheet(nested));
  });
});

describe('planFlowsheet: inconsistent input is reported, one message per problem', () => {
  it('a stream with two sources and a duplicate unit name', () => {
    try {
      planFlowsheet([unit('a', ['f1'], ['s']), unit('b', ['f2'], ['s']), unit('a', ['s'], ['p'])]);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(FlowsheetGraphError);
      const problems = (e as FlowsheetGraphError).problems;
      expect(problems).toHaveLength(2);
      expect(problems.join('\n')).toMatch(/unit "a" is defined more than once/);
      expect(problems.join('\n')).toMatch(/stream "s" is an outlet of both "a" and "b"/);
    }
  });

  it('a stream with two destinations', () => {
    expect(() => planFlowsheet([unit('a', ['f'], ['s']), unit('b', ['s'], ['p']), unit('c', ['s'], ['q'])])).toThrow(
      /stream "s" is an inlet of both "b" and "c"/,
    );
  });

  it('a given tear that is a feed, or unknown', () => {
    const units = [unit('a', ['feed', 'r'], ['x']), unit('b', ['x'], ['r', 'out'])];
    expect(() => planFlowsheet(units, ['feed'])).toThrow(/feed or a product/);
    expect(() => planFlowsheet(units, ['nope'])).toThrow(/not a stream of this flowsheet/);
  });

  it('a given tear on no loop is kept and noted', () => {
    const units = [unit('a', ['feed'], ['x']), unit('b', ['x', 'r'], ['y']), unit('c', ['y'], ['r', 'out'])];
    const plan = planFlowsheet(units, ['x']);
    expect(plan.tears).toContain('x');
    expect(plan.addedTears).toEqual(['r']);
    expect(plan.notes.join(' ')).toMatch(/"x" is on no recycle loop/);
  });
});

describe('planFlowsheet: large flowsheets', () => {
  /**
   * A chain of `n` units u0..u(n-1). Every block of 10 units has an inner recycle from its
   * last unit to its first; every block of 100 an outer recycle from its last unit to its
   * first, enclosing ten inner loops. The ten inner cycles of a block share no stream, so a
   * block needs at least 10 tears; tearing one chain stream inside each inner loop also
   * breaks the outer cycle, so 10 per block is the minimum.
   */
  function nestedChain(n: number): GraphUnit[] {
    const inlets: string[][] = Array.from({ length: n }, () => []);
    const outlets: string[][] = Array.from({ length: n }, () => []);
    inlets[0].push('feed');
    for (let i = 0; i + 1 < n; i++) {
      outlets[i].push(`s${i}`);
      inlets[i + 1].push(`s${i}`);
    }
    outlets[n - 1].push('product');
    for (let b = 0; b + 9 < n; b += 10) {
      outlets[b + 9].push(`inner${b}`);
      inlets[b].push(`inner${b}`);
    }
    for (let b = 0; b + 99 < n; b += 100) {
      outlets[b + 99].push(`outer${b}`);
      inlets[b].push(`outer${b}`);
    }
    return inlets.map((ins, i) => unit(`u${i}`, ins, outlets[i]));
  }

  it('1000 units with nested recycles: valid tears, minimum count, valid order', () => {
    const units = nestedChain(1000);
    const plan = planFlowsheet(units);
    expect(plan.loops).toHaveLength(10);
    for (const loop of plan.loops) expect(loop).toHaveLength(100);
    expect(plan.tears).toHaveLength(100);
    expect(acyclicWithout(units, plan.tears)).toBe(true);
    expect(orderRespects(units, plan)).toBe(true);
  });

  it('a 20000-unit chain with one recycle around it all (no recursion depth limit)', () => {
    const n = 20000;
    const units = Array.from({ length: n }, (_, i) =>
      unit(`u${i}`, i === 0 ? ['feed', 'back'] : [`s${i - 1}`], i === n - 1 ? ['back', 'out'] : [`s${i}`]),
    );
    const plan = planFlowsheet(units);
    expect(plan.tears).toHaveLength(1);
    expect(plan.loops[0]).toHaveLength(n);
    expect(orderRespects(units, plan)).toBe(true);
  });
});
