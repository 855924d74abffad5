// The life-cycle graph of a projection matrix: an edge j → i whenever
// a_ij > 0 (an individual in stage j can be in stage i one step later).
// Irreducibility, primitivity and reducible block structure are properties of
// this graph alone (Caswell 2001, §4.4), so they are decided exactly, without
// floating-point tolerances.

/** Adjacency in compressed form: the successors of stage j are targets[start[j] .. start[j+1]). */
export interface LifeCycleGraph {
  readonly n: number;
  readonly start: Int32Array;
  readonly targets: Int32Array;
}

export interface GraphStructure {
  /** The adjacency (built on first use: the common irreducible case never needs it). */
  readonly graph: () => LifeCycleGraph;
  /** The adjacency with every edge reversed (built on first use). */
  readonly reverse: () => LifeCycleGraph;
  /** Strongly connected components (sets of stages that all lead to each other), upstream blocks first. */
  readonly components: readonly (readonly number[])[];
  /** componentOf[stage] = index into components. */
  readonly componentOf: Int32Array;
  /** Per component: true when it contains a loop (more than one stage, or a stage that can stay). */
  readonly componentHasCycle: readonly boolean[];
  /** Per component: gcd of its loop lengths (its index of imprimitivity), or null when it has no loop. */
  readonly componentPeriod: readonly (number | null)[];
  readonly irreducible: boolean;
  /** True when the graph has at least one loop; otherwise the matrix is nilpotent and λ = 0 exactly. */
  readonly hasCycle: boolean;
}

/** Build the life-cycle graph of a row-major n×n matrix (edge j → i when a_ij > 0). */
export function lifeCycleGraph(a: Float64Array, n: number): LifeCycleGraph {
  const count = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) {
    const base = i * n;
    for (let j = 0; j < n; j++) if ((a[base + j] as number) > 0) count[j + 1] = (count[j + 1] as number) + 1;
  }
  for (let j = 0; j < n; j++) count[j + 1] = (count[j + 1] as number) + (count[j] as number);
  const start = Int32Array.from(count);
  const fill = Int32Array.from(count);
  const targets = new Int32Array(count[n] as number);
  for (let i = 0; i < n; i++) {
    const base = i * n;
    for (let j = 0; j < n; j++) {
      if ((a[base + j] as number) > 0) {
        const at = fill[j] as number;
        targets[at] = i;
        fill[j] = at + 1;
      }
    }
  }
  return { n, start, targets };
}

/** Components, loops and periods of the life-cycle graph of `a`. */
export function graphStructure(a: Float64Array, n: number): GraphStructure {
  let forward: LifeCycleGraph | null = null;
  let backward: LifeCycleGraph | null = null;
  const graph = (): LifeCycleGraph => (forward ??= lifeCycleGraph(a, n));
  const reverse = (): LifeCycleGraph => (backward ??= reverseGraph(graph()));

  // Fast path on the dense matrix: strongly connected when stage 1 reaches
  // every stage and every stage reaches stage 1. O(n²) scans, no adjacency lists.
  if (n > 1) {
    const level = denseForwardLevels(a, n);
    if (level.every((l) => l >= 0) && denseReachesFirst(a, n)) {
      return {
        graph,
        reverse,
        components: [Array.from({ length: n }, (_, i) => i)],
        componentOf: new Int32Array(n),
        componentHasCycle: [true],
        componentPeriod: [denseLoopGcd(a, n, level)],
        irreducible: true,
        hasCycle: true,
      };
    }
  }

  const { componentOf, components } = stronglyConnectedComponents(graph());
  const componentHasCycle: boolean[] = [];
  const componentPeriod: (number | null)[] = [];
  for (const comp of components) {
    if (comp.length === 1) {
      const s = comp[0] as number;
      const loop = (a[s * n + s] as number) > 0;
      componentHasCycle.push(loop);
      componentPeriod.push(loop ? 1 : null);
    } else {
      componentHasCycle.push(true);
      componentPeriod.push(componentLoopGcd(graph(), componentOf, comp));
    }
  }
  return {
    graph,
    reverse,
    components,
    componentOf,
    componentHasCycle,
    componentPeriod,
    irreducible: components.length === 1 && componentHasCycle[0] === true,
    hasCycle: componentHasCycle.some((c) => c),
  };
}

/** Breadth-first levels from stage 0 along edges j → i (a_ij > 0); −1 where unreached. */
function denseForwardLevels(a: Float64Array, n: number): Int32Array {
  const level = new Int32Array(n).fill(-1);
  const queue = new Int32Array(n);
  level[0] = 0;
  let tail = 1;
  for (let head = 0; head < tail; head++) {
    const j = queue[head] as number;
    const next = (level[j] as number) + 1;
    for (let i = 0; i < n; i++) {
      if (level[i] === -1 && (a[i * n + j] as number) > 0) {
        level[i] = next;
        queue[tail++] = i;
      }
    }
  }
  return level;
}

/** True when every stage has a path to stage 0 (search along reversed edges, scanning rows). */
function denseReachesFirst(a: Float64Array, n: number): boolean {
  const seen = new Uint8Array(n);
  const queue = new Int32Array(n);
  seen[0] = 1;
  let tail = 1;
  for (let head = 0; head < tail; head++) {
    const i = queue[head] as number;
    const base = i * n;
    for (let j = 0; j < n; j++) {
      if (seen[j] === 0 && (a[base + j] as number) > 0) {
        seen[j] = 1;
        queue[tail++] = j;
      }
    }
  }
  return tail === n;
}

/** gcd of loop lengths of a strongly connected matrix from its BFS levels; stops as soon as it reaches 1. */
function denseLoopGcd(a: Float64Array, n: number, level: Int32Array): number {
  let g = 0;
  for (let i = 0; i < n; i++) {
    const base = i * n;
    const li = level[i] as number;
    for (let j = 0; j < n; j++) {
      if ((a[base + j] as number) > 0) {
        const d = (level[j] as number) + 1 - li;
        if (d !== 0) {
          g = gcd(g, d < 0 ? -d : d);
          if (g === 1) return 1;
        }
      }
    }
  }
  return g === 0 ? 1 : g;
}

/**
 * Tarjan's algorithm without recursion (deep life cycles would overflow the
 * call stack). Tarjan finds downstream components first; they are reversed
 * so that components come out upstream first.
 */
export function stronglyConnectedComponents(graph: LifeCycleGraph): { componentOf: Int32Array; components: number[][] } {
  const { n, start, targets } = graph;
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const stack = new Int32Array(n);
  let sp = 0;
  const callNode = new Int32Array(n);
  const callEdge = new Int32Array(n);
  let depth = 0;
  let counter = 0;
  const found: number[][] = [];
  for (let root = 0; root < n; root++) {
    if (index[root] !== -1) continue;
    callNode[0] = root;
    callEdge[0] = start[root] as number;
    depth = 1;
    index[root] = counter;
    low[root] = counter;
    counter += 1;
    stack[sp++] = root;
    onStack[root] = 1;
    while (depth > 0) {
      const v = callNode[depth - 1] as number;
      const e = callEdge[depth - 1] as number;
      if (e < (start[v + 1] as number)) {
        callEdge[depth - 1] = e + 1;
        const w = targets[e] as number;
        if (index[w] === -1) {
          index[w] = counter;
          low[w] = counter;
          counter += 1;
          stack[sp++] = w;
          onStack[w] = 1;
          callNode[depth] = w;
          callEdge[depth] = start[w] as number;
          depth += 1;
        } else if (onStack[w] === 1) {
          low[v] = Math.min(low[v] as number, index[w] as number);
        }
        continue;
      }
      // All successors of v done.
      if (low[v] === index[v]) {
        const comp: number[] = [];
        let w: number;
        do {
          w = stack[--sp] as number;
          onStack[w] = 0;
          comp.push(w);
        } while (w !== v);
        comp.sort((p, q) => p - q);
        found.push(comp);
      }
      depth -= 1;
      if (depth > 0) {
        const parent = callNode[depth - 1] as number;
        low[parent] = Math.min(low[parent] as number, low[v] as number);
      }
    }
  }
  found.reverse();
  const componentOf = new Int32Array(n);
  found.forEach((comp, c) => {
    for (const s of comp) componentOf[s] = c;
  });
  return { componentOf, components: found };
}

/**
 * Index of imprimitivity of a strongly connected component: the gcd of all
 * its loop lengths, computed as the gcd of level(u) + 1 − level(v) over the
 * component's edges u → v, with levels from a breadth-first search.
 */
function componentLoopGcd(graph: LifeCycleGraph, componentOf: Int32Array, comp: readonly number[]): number {
  const { start, targets } = graph;
  const c = componentOf[comp[0] as number] as number;
  const level = new Int32Array(graph.n).fill(-1);
  const root = comp[0] as number;
  level[root] = 0;
  const queue: number[] = [root];
  let g = 0;
  for (let head = 0; head < queue.length; head++) {
    const u = queue[head] as number;
    const lu = level[u] as number;
    for (let e = start[u] as number; e < (start[u + 1] as number); e++) {
      const v = targets[e] as number;
      if (componentOf[v] !== c) continue;
      const lv = level[v] as number;
      if (lv === -1) {
        level[v] = lu + 1;
        queue.push(v);
      } else {
        g = gcd(g, Math.abs(lu + 1 - lv));
        if (g === 1) return 1;
      }
    }
  }
  return g === 0 ? 1 : g;
}

function gcd(a: number, b: number): number {
  while (b !== 0) {
    const t = a % b;
    a = b;
    b = t;
  }
  return a;
}

/**
 * Stages reachable from `sources` along edges. With `minSteps = 1` a source
 * counts only if some path of length ≥ 1 returns to it; with 0 every source
 * counts as reached.
 */
export function reachableFrom(graph: LifeCycleGraph, sources: readonly number[], minSteps: 0 | 1): Uint8Array {
  const { n, start, targets } = graph;
  const seen = new Uint8Array(n);
  const queue: number[] = [];
  for (const s of sources) {
    if (minSteps === 0) {
      if (seen[s] === 0) {
        seen[s] = 1;
        queue.push(s);
      }
    } else {
      for (let e = start[s] as number; e < (start[s + 1] as number); e++) {
        const t = targets[e] as number;
        if (seen[t] === 0) {
          seen[t] = 1;
          queue.push(t);
        }
      }
    }
  }
  for (let head = 0; head < queue.length; head++) {
    const u = queue[head] as number;
    for (let e = start[u] as number; e < (start[u + 1] as number); e++) {
      const t = targets[e] as number;
      if (seen[t] === 0) {
        seen[t] = 1;
        queue.push(t);
      }
    }
  }
  return seen;
}

/** The graph with every edge reversed (edge i → j when a_ij > 0). */
export function reverseGraph(graph: LifeCycleGraph): LifeCycleGraph {
  const { n, start, targets } = graph;
  const count = new Int32Array(n + 1);
  for (let e = 0; e < targets.length; e++) count[(targets[e] as number) + 1] = (count[(targets[e] as number) + 1] as number) + 1;
  for (let j = 0; j < n; j++) count[j + 1] = (count[j + 1] as number) + (count[j] as number);
  const rStart = Int32Array.from(count);
  const fill = Int32Array.from(count);
  const rTargets = new Int32Array(targets.length);
  for (let u = 0; u < n; u++) {
    for (let e = start[u] as number; e < (start[u + 1] as number); e++) {
      const v = targets[e] as number;
      const at = fill[v] as number;
      rTargets[at] = u;
      fill[v] = at + 1;
    }
  }
  return { n, start: rStart, targets: rTargets };
}
