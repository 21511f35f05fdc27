/**
 * Flowsheet graph analysis: recycle loops, tear streams and the calculation order.
 *
 * Units are nodes, streams are named edges from the unit that makes them to the unit that
 * takes them. A stream made by no unit is a feed, one taken by no unit is a product.
 *
 *  1. Recycle loops are the strongly connected components that contain a cycle, found with
 *     Tarjan's algorithm (Tarjan, "Depth-first search and linear graph algorithms", SIAM J.
 *     Comput. 1(2) (1972) 146-160), written with an explicit stack (no recursion) so that
 *     flowsheets of many thousands of units do not overflow the call stack.
 *  2. Tear streams: within each loop, the fewest streams whose removal leaves no cycle (a
 *     minimum feedback arc set). For a component with at most `exactLimit` internal streams
 *     (default 20) every set of 1, 2, ... streams is tried in lexicographic order of stream
 *     names, so the first set that breaks all cycles is both minimal and deterministic. Larger
 *     components use the greedy ordering heuristic of Eades, Lin and Smyth ("A fast and
 *     effective heuristic for the feedback arc set problem", Inf. Process. Lett. 47 (1993)
 *     319-323): streams that point backwards in that ordering are torn, then every tear that
 *     is not needed (the rest stays acyclic without it) is dropped again, in name order. The
 *     greedy result breaks every cycle but is not guaranteed to be the smallest set.
 *  3. The calculation order is a topological order of the units once the tears are removed
 *     (Kahn's algorithm), ties broken by the order the units were given in.
 * Everything is deterministic for a given input.
 */

export interface GraphUnit {
  name: string;
  inlets: readonly string[];
  outlets: readonly string[];
}

export interface Plan {
  /** Unit names in calculation order. */
  order: string[];
  /** Tear streams (loops in calculation order, within a loop by name). */
  tears: string[];
  /** Units of each recycle loop (strongly connected component with a cycle), in calculation order. */
  loops: string[][];
  /** Tear streams of each loop, parallel to loops. */
  loopTears: string[][];
  /** Tears added to the user's fixed tears because those did not break every cycle. */
  addedTears: string[];
  /** Remarks for the user: added tears, fixed tears that are on no loop, greedy tearing used. */
  notes: string[];
}

export interface PlanOptions {
  /** Largest number of internal streams of a loop searched exactly (default 20). */
  exactLimit?: number;
}

/** The flowsheet's connections are inconsistent; one message per problem. */
export class FlowsheetGraphError extends Error {
  readonly problems: string[];
  constructor(problems: string[]) {
    super(problems.join('\n'));
    this.name = 'FlowsheetGraphError';
    this.problems = problems;
  }
}

const DEFAULT_EXACT_LIMIT = 20;

/** Internal edge list of the flowsheet. */
interface Graph {
  unitNames: string[];
  /** Internal streams (made by one unit and taken by one unit). */
  streamNames: string[];
  from: Int32Array;
  to: Int32Array;
  streamIndex: Map<string, number>;
}

function buildGraph(units: readonly GraphUnit[]): Graph {
  const problems: string[] = [];
  const unitIndex = new Map<string, number>();
  units.forEach((u, i) => {
    if (unitIndex.has(u.name)) problems.push(`unit "${u.name}" is defined more than once; give each unit its own name`);
    else unitIndex.set(u.name, i);
  });
  const maker = new Map<string, number>();
  const taker = new Map<string, number>();
  units.forEach((u, i) => {
    for (const s of u.outlets) {
      const other = maker.get(s);
      if (other !== undefined) {
        problems.push(
          other === i
            ? `unit "${u.name}" lists outlet stream "${s}" twice`
            : `stream "${s}" is an outlet of both "${units[other].name}" and "${u.name}"; a stream has one source (use a mixer to join streams)`,
        );
      } else maker.set(s, i);
    }
    for (const s of u.inlets) {
      const other = taker.get(s);
      if (other !== undefined) {
        problems.push(
          other === i
            ? `unit "${u.name}" lists inlet stream "${s}" twice`
            : `stream "${s}" is an inlet of both "${units[other].name}" and "${u.name}"; a stream has one destination (use a splitter to divide a stream)`,
        );
      } else taker.set(s, i);
    }
  });
  if (problems.length > 0) throw new FlowsheetGraphError(problems);

  const streamNames: string[] = [];
  const from: number[] = [];
  const to: number[] = [];
  // Streams in the order the units list their outlets: deterministic.
  units.forEach((u, i) => {
    for (const s of u.outlets) {
      const t = taker.get(s);
      if (t === undefined) continue; // product
      streamNames.push(s);
      from.push(i);
      to.push(t);
    }
  });
  const streamIndex = new Map<string, number>();
  streamNames.forEach((s, k) => streamIndex.set(s, k));
  return {
    unitNames: units.map((u) => u.name),
    streamNames,
    from: Int32Array.from(from),
    to: Int32Array.from(to),
    streamIndex,
  };
}

/** Compressed adjacency (edges by source unit) of the edges not removed. */
function adjacency(n: number, g: Graph, removed: Uint8Array): { start: Int32Array; edge: Int32Array } {
  const start = new Int32Array(n + 1);
  const m = g.from.length;
  for (let e = 0; e < m; e++) if (!removed[e]) start[g.from[e] + 1]++;
  for (let v = 0; v < n; v++) start[v + 1] += start[v];
  const fill = start.slice(0, n);
  const edge = new Int32Array(start[n]);
  for (let e = 0; e < m; e++) if (!removed[e]) edge[fill[g.from[e]]++] = e;
  return { start, edge };
}

/**
 * Strongly connected components, Tarjan (1972), iterative. Returns the component of each unit;
 * components are numbered in reverse topological order (Tarjan's property).
 */
export function stronglyConnected(
  n: number,
  start: Int32Array,
  edge: Int32Array,
  to: Int32Array,
): { component: Int32Array; count: number } {
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const stack = new Int32Array(n);
  const call = new Int32Array(n);
  const next = new Int32Array(n);
  const component = new Int32Array(n).fill(-1);
  let sp = 0;
  let cp = 0;
  let counter = 0;
  let count = 0;
  for (let root = 0; root < n; root++) {
    if (index[root] >= 0) continue;
    index[root] = low[root] = counter++;
    stack[sp++] = root;
    onStack[root] = 1;
    call[cp++] = root;
    next[root] = start[root];
    while (cp > 0) {
      const v = call[cp - 1];
      if (next[v] < start[v + 1]) {
        const w = to[edge[next[v]++]];
        if (index[w] < 0) {
          index[w] = low[w] = counter++;
          stack[sp++] = w;
          onStack[w] = 1;
          call[cp++] = w;
          next[w] = start[w];
        } else if (onStack[w] && index[w] < low[v]) {
          low[v] = index[w];
        }
      } else {
        cp--;
        if (cp > 0) {
          const u = call[cp - 1];
          if (low[v] < low[u]) low[u] = low[v];
        }
        if (low[v] === index[v]) {
          let w: number;
          do {
            w = stack[--sp];
            onStack[w] = 0;
            component[w] = count;
          } while (w !== v);
          count++;
        }
      }
    }
  }
  return { component, count };
}

/** A loop in local numbering: units 0..size-1, streams 0..edges-1 sorted by stream name. */
interface LocalLoop {
  size: number;
  from: Int32Array;
  to: Int32Array;
  /** Global stream index of each local stream. */
  global: Int32Array;
}

/** Checker of acyclicity with preallocated work arrays (Kahn's algorithm). */
class AcyclicCheck {
  private readonly indeg: Int32Array;
  private readonly queue: Int32Array;
  private readonly start: Int32Array;
  private readonly edge: Int32Array;
  constructor(private readonly loop: LocalLoop) {
    const { size, from } = loop;
    this.indeg = new Int32Array(size);
    this.queue = new Int32Array(size);
    this.start = new Int32Array(size + 1);
    for (let e = 0; e < from.length; e++) this.start[from[e] + 1]++;
    for (let v = 0; v < size; v++) this.start[v + 1] += this.start[v];
    const fill = this.start.slice(0, size);
    this.edge = new Int32Array(from.length);
    for (let e = 0; e < from.length; e++) this.edge[fill[from[e]]++] = e;
  }

  /** True when the loop's graph without the torn streams has no cycle. */
  acyclic(torn: Uint8Array): boolean {
    const { size, from, to } = this.loop;
    const { indeg, queue, start, edge } = this;
    indeg.fill(0);
    for (let e = 0; e < from.length; e++) if (!torn[e]) indeg[to[e]]++;
    let head = 0;
    let tail = 0;
    for (let v = 0; v < size; v++) if (indeg[v] === 0) queue[tail++] = v;
    while (head < tail) {
      const v = queue[head++];
      for (let k = start[v]; k < start[v + 1]; k++) {
        const e = edge[k];
        if (torn[e]) continue;
        if (--indeg[to[e]] === 0) queue[tail++] = to[e];
      }
    }
    return tail === size;
  }
}

/** Smallest tear set by exhaustive search over sets of increasing size (lexicographic). */
function exactTears(loop: LocalLoop): number[] {
  const m = loop.from.length;
  const check = new AcyclicCheck(loop);
  const torn = new Uint8Array(m);
  const pick = new Int32Array(m);
  for (let k = 1; k <= m; k++) {
    for (let i = 0; i < k; i++) pick[i] = i;
    for (;;) {
      torn.fill(0);
      for (let i = 0; i < k; i++) torn[pick[i]] = 1;
      if (check.acyclic(torn)) return Array.from(pick.subarray(0, k));
      // Next combination of k out of m in lexicographic order.
      let i = k - 1;
      while (i >= 0 && pick[i] === m - k + i) i--;
      if (i < 0) break;
      pick[i]++;
      for (let j = i + 1; j < k; j++) pick[j] = pick[j - 1] + 1;
    }
  }
  return []; // unreachable for a loop: tearing every stream leaves no cycle
}

/**
 * Greedy tears: Eades, Lin and Smyth (1993) ordering (sinks to the back, sources to the front,
 * otherwise the unit with the largest out-degree minus in-degree to the front; ties by lowest
 * local index), streams pointing backwards torn, then redundant tears dropped in name order.
 */
function greedyTears(loop: LocalLoop): number[] {
  const { size, from, to } = loop;
  const m = from.length;
  const outStart = new Int32Array(size + 1);
  const inStart = new Int32Array(size + 1);
  for (let e = 0; e < m; e++) {
    outStart[from[e] + 1]++;
    inStart[to[e] + 1]++;
  }
  for (let v = 0; v < size; v++) {
    outStart[v + 1] += outStart[v];
    inStart[v + 1] += inStart[v];
  }
  const outEdge = new Int32Array(m);
  const inEdge = new Int32Array(m);
  {
    const fo = outStart.slice(0, size);
    const fi = inStart.slice(0, size);
    for (let e = 0; e < m; e++) {
      outEdge[fo[from[e]]++] = e;
      inEdge[fi[to[e]]++] = e;
    }
  }
  const outDeg = new Int32Array(size);
  const inDeg = new Int32Array(size);
  const torn = new Uint8Array(m);
  // Self-loops are always torn and take no part in the ordering.
  for (let e = 0; e < m; e++) {
    if (from[e] === to[e]) torn[e] = 1;
    else {
      outDeg[from[e]]++;
      inDeg[to[e]]++;
    }
  }
  const alive = new Uint8Array(size).fill(1);
  let remaining = size;
  const front: number[] = [];
  const back: number[] = [];
  const pending: number[] = [];
  for (let v = 0; v < size; v++) pending.push(v);

  const remove = (v: number) => {
    alive[v] = 0;
    remaining--;
    for (let k = outStart[v]; k < outStart[v + 1]; k++) {
      const e = outEdge[k];
      if (torn[e]) continue;
      const w = to[e];
      if (alive[w]) {
        inDeg[w]--;
        pending.push(w);
      }
    }
    for (let k = inStart[v]; k < inStart[v + 1]; k++) {
      const e = inEdge[k];
      if (torn[e]) continue;
      const w = from[e];
      if (alive[w]) {
        outDeg[w]--;
        pending.push(w);
      }
    }
  };

  while (remaining > 0) {
    // Peel sinks and sources as long as there are any.
    while (pending.length > 0) {
      const v = pending.pop() as number;
      if (!alive[v]) continue;
      if (outDeg[v] === 0) {
        back.push(v);
        remove(v);
      } else if (inDeg[v] === 0) {
        front.push(v);
        remove(v);
      }
    }
    if (remaining === 0) break;
    let best = -1;
    let bestDelta = -Infinity;
    for (let v = 0; v < size; v++) {
      if (alive[v] && outDeg[v] - inDeg[v] > bestDelta) {
        bestDelta = outDeg[v] - inDeg[v];
        best = v;
      }
    }
    front.push(best);
    remove(best);
  }
  const position = new Int32Array(size);
  front.forEach((v, k) => (position[v] = k));
  for (let k = 0; k < back.length; k++) position[back[k]] = size - 1 - k;
  for (let e = 0; e < m; e++) if (!torn[e] && position[from[e]] >= position[to[e]]) torn[e] = 1;

  // Drop tears that are not needed, in stream-name order (local indices are name-sorted).
  const check = new AcyclicCheck(loop);
  for (let e = 0; e < m; e++) {
    if (!torn[e] || from[e] === to[e]) continue;
    torn[e] = 0;
    if (!check.acyclic(torn)) torn[e] = 1;
  }
  const out: number[] = [];
  for (let e = 0; e < m; e++) if (torn[e]) out.push(e);
  return out;
}

const byName = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Plans the calculation of a flowsheet: recycle loops, tear streams and the order of the
 * units. fixedTears are used as given; when they leave a cycle, the fewest further tears are
 * added and reported in addedTears and notes. Throws FlowsheetGraphError for inconsistent
 * connections (a stream with two sources or two destinations, a duplicate unit name, a fixed
 * tear that is not a stream between two units).
 */
export function planFlowsheet(
  units: readonly GraphUnit[],
  fixedTears: readonly string[] = [],
  options: PlanOptions = {},
): Plan {
  const exactLimit = options.exactLimit ?? DEFAULT_EXACT_LIMIT;
  const g = buildGraph(units);
  const n = units.length;
  const m = g.streamNames.length;
  const notes: string[] = [];

  // Validate the fixed tears.
  const problems: string[] = [];
  const removed = new Uint8Array(m);
  const external = new Set<string>();
  for (const u of units) for (const s of [...u.inlets, ...u.outlets]) if (!g.streamIndex.has(s)) external.add(s);
  for (const s of fixedTears) {
    const e = g.streamIndex.get(s);
    if (e === undefined) {
      problems.push(
        external.has(s)
          ? `tear stream "${s}" is a feed or a product, not a stream between two units; choose a stream inside a recycle loop`
          : `tear stream "${s}" is not a stream of this flowsheet`,
      );
    } else if (removed[e]) problems.push(`tear stream "${s}" is listed twice`);
    else removed[e] = 1;
  }
  if (problems.length > 0) throw new FlowsheetGraphError(problems);

  // 1. Recycle loops of the whole flowsheet.
  const none = new Uint8Array(m);
  const full = adjacency(n, g, none);
  const scc = stronglyConnected(n, full.start, full.edge, g.to);
  const cyclic = cyclicComponents(g, scc.component, scc.count);
  for (const s of fixedTears) {
    const e = g.streamIndex.get(s) as number;
    const c = scc.component[g.from[e]];
    if (c !== scc.component[g.to[e]] || !cyclic[c]) {
      notes.push(`tear stream "${s}" is on no recycle loop; it is kept as given but is not needed`);
    }
  }

  // 2. Tears: the fixed ones, then the fewest more for each loop that remains.
  const torn = Uint8Array.from(removed);
  const rest = adjacency(n, g, removed);
  const sub = stronglyConnected(n, rest.start, rest.edge, g.to);
  const subCyclic = cyclicComponents(g, sub.component, sub.count, removed);
  const added: string[] = [];
  const members: number[][] = Array.from({ length: sub.count }, () => []);
  for (let v = 0; v < n; v++) members[sub.component[v]].push(v);
  for (let c = 0; c < sub.count; c++) {
    if (!subCyclic[c]) continue;
    const loop = localLoop(g, members[c], sub.component, c, removed);
    let pick: number[];
    if (loop.from.length <= exactLimit) pick = exactTears(loop);
    else {
      pick = greedyTears(loop);
      notes.push(
        `a recycle loop of ${members[c].length} units and ${loop.from.length} streams was torn by a greedy rule (${pick.length} tears); fewer tears may exist`,
      );
    }
    for (const k of pick) {
      torn[loop.global[k]] = 1;
      added.push(g.streamNames[loop.global[k]]);
    }
  }
  if (fixedTears.length > 0 && added.length > 0) {
    notes.push(
      `the given tear streams leave ${added.length === 1 ? 'a cycle' : 'cycles'} open; added tear stream${added.length === 1 ? '' : 's'} ${added
        .slice()
        .sort(byName)
        .map((s) => `"${s}"`)
        .join(', ')}`,
    );
  }

  // 3. Calculation order: Kahn's algorithm on the torn graph, ties by input order (a min-heap).
  const order = topologicalOrder(n, g, torn);

  // Loops of the original flowsheet, in calculation order, with their tears.
  const loopsIdx: number[][] = [];
  const byComponent = new Map<number, number>();
  for (const v of order) {
    const c = scc.component[v];
    if (!cyclic[c]) continue;
    let k = byComponent.get(c);
    if (k === undefined) {
      k = loopsIdx.length;
      byComponent.set(c, k);
      loopsIdx.push([]);
    }
    loopsIdx[k].push(v);
  }
  const loopTears: string[][] = loopsIdx.map(() => []);
  for (let e = 0; e < m; e++) {
    if (!torn[e]) continue;
    const c = scc.component[g.from[e]];
    const k = c === scc.component[g.to[e]] ? byComponent.get(c) : undefined;
    if (k !== undefined) loopTears[k].push(g.streamNames[e]);
  }
  for (const t of loopTears) t.sort(byName);
  const tears = loopTears.flat();
  // Fixed tears on no loop are still tears (the user asked for them).
  const offLoop = fixedTears.filter((s) => !tears.includes(s)).slice().sort(byName);

  return {
    order: order.map((v) => g.unitNames[v]),
    tears: tears.concat(offLoop),
    loops: loopsIdx.map((l) => l.map((v) => g.unitNames[v])),
    loopTears,
    addedTears: fixedTears.length > 0 ? added.slice().sort(byName) : [],
    notes,
  };
}

/** Which components hold a cycle: more than one unit, or a stream from a unit to itself. */
function cyclicComponents(g: Graph, component: Int32Array, count: number, removed?: Uint8Array): Uint8Array {
  const size = new Int32Array(count);
  for (let v = 0; v < component.length; v++) size[component[v]]++;
  const cyclic = new Uint8Array(count);
  for (let c = 0; c < count; c++) if (size[c] > 1) cyclic[c] = 1;
  for (let e = 0; e < g.from.length; e++) {
    if (removed?.[e]) continue;
    if (g.from[e] === g.to[e]) cyclic[component[g.from[e]]] = 1;
  }
  return cyclic;
}

/** The internal streams of one component, renumbered locally and sorted by stream name. */
function localLoop(g: Graph, units: number[], component: Int32Array, c: number, removed: Uint8Array): LocalLoop {
  const local = new Map<number, number>();
  units.forEach((v, k) => local.set(v, k));
  const edges: number[] = [];
  for (let e = 0; e < g.from.length; e++) {
    if (removed[e]) continue;
    if (component[g.from[e]] === c && component[g.to[e]] === c) edges.push(e);
  }
  edges.sort((a, b) => byName(g.streamNames[a], g.streamNames[b]));
  return {
    size: units.length,
    from: Int32Array.from(edges, (e) => local.get(g.from[e]) as number),
    to: Int32Array.from(edges, (e) => local.get(g.to[e]) as number),
    global: Int32Array.from(edges),
  };
}

/** Kahn's algorithm with a binary min-heap on the unit index. */
function topologicalOrder(n: number, g: Graph, torn: Uint8Array): number[] {
  const adj = adjacency(n, g, torn);
  const indeg = new Int32Array(n);
  for (let e = 0; e < g.from.length; e++) if (!torn[e]) indeg[g.to[e]]++;
  const heap = new Int32Array(n);
  let size = 0;
  const push = (v: number) => {
    let i = size++;
    heap[i] = v;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (heap[p] <= heap[i]) break;
      const t = heap[p];
      heap[p] = heap[i];
      heap[i] = t;
      i = p;
    }
  };
  const pop = (): number => {
    const top = heap[0];
    heap[0] = heap[--size];
    let i = 0;
    for (;;) {
      const l = 2 * i + 1;
      const r = l + 1;
      let s = i;
      if (l < size && heap[l] < heap[s]) s = l;
      if (r < size && heap[r] < heap[s]) s = r;
      if (s === i) break;
      const t = heap[s];
      heap[s] = heap[i];
      heap[i] = t;
      i = s;
    }
    return top;
  };
  for (let v = 0; v < n; v++) if (indeg[v] === 0) push(v);
  const order: number[] = [];
  while (size > 0) {
    const v = pop();
    order.push(v);
    for (let k = adj.start[v]; k < adj.start[v + 1]; k++) {
      const w = g.to[adj.edge[k]];
      if (--indeg[w] === 0) push(w);
    }
  }
  if (order.length !== n) {
    // Cannot happen when every cyclic component was torn; guard against a logic error.
    throw new Error(`internal error: ${n - order.length} units remain on a cycle after tearing`);
  }
  return order;
}
