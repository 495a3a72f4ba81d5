/**
 * Terms, sums of squares and degrees of freedom of a balanced design with crossed and nested factors
 * (every cell of the finest classification holds the same number r of runs). A term is a set of "own"
 * factors, none nested in another, together with the factors they are nested in ("parents", written in
 * parentheses: `cavity(mold)`). Method (Hartley 1967; Searle, Casella & McCulloch 1992, §4.6): the
 * effect of term T with own factors O and parents P at a cell of O ∪ P is the alternating sum of
 * marginal means Σ_{V ⊆ O} (-1)^{|O|-|V|} ȳ(P ∪ V), and SS_T = (N / Π_{O∪P} levels)·Σ effect²; its df is
 * Π_{O}(levels - 1)·Π_{P} levels. With r = 1 the term holding every factor has no error to be tested
 * against and becomes the residual.
 */

/** A factor of a balanced design. For a nested factor `levels` counts its levels within one parent level. */
export interface BalancedFactor {
  readonly name: string;
  readonly levels: number;
  /** Index of the factor this one is nested in. */
  readonly parent?: number;
  readonly random: boolean;
}

/** Observations: per factor the level (within its parent) of every run, and the responses. */
export interface BalancedData {
  readonly factors: readonly BalancedFactor[];
  readonly codes: readonly Int32Array[];
  readonly y: Float64Array;
}

/** One term of the balanced model. */
export interface BalancedTerm {
  readonly name: string;
  /** Bit mask of own factors. */
  readonly own: number;
  /** Bit mask of own factors and every ancestor ("subscripts" of the term). */
  readonly scope: number;
  readonly random: boolean;
  readonly df: number;
  readonly ss: number;
}

export interface BalancedAnova {
  readonly ok: true;
  readonly n: number;
  /** Runs per finest cell. */
  readonly replicates: number;
  readonly terms: readonly BalancedTerm[];
  /** Within-cell error; with r = 1 the highest-order term, named "Residual" as well. */
  readonly residual: { readonly df: number; readonly ss: number };
  readonly total: { readonly df: number; readonly ss: number };
}

export type BalancedFailure = { readonly ok: false; readonly reason: string };

/** Bit mask of a factor and all its ancestors. */
export function ancestry(factors: readonly BalancedFactor[], f: number): number {
  let mask = 0;
  let cur: number | undefined = f;
  let guard = 0;
  while (cur !== undefined && guard++ <= factors.length) {
    mask |= 1 << cur;
    cur = factors[cur]!.parent;
  }
  return mask;
}

function bits(mask: number, count: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < count; i++) if ((mask >> i) & 1) out.push(i);
  return out;
}

/** The name of a term: own factors joined by " x ", followed by the parents in parentheses. */
export function balancedTermName(factors: readonly BalancedFactor[], own: number, scope: number): string {
  const names = bits(own, factors.length).map((i) => factors[i]!.name);
  const parents = bits(scope & ~own, factors.length).map((i) => factors[i]!.name);
  return parents.length > 0 ? `${names.join(" x ")}(${parents.join(" x ")})` : names.join(" x ");
}

/** All terms of the full balanced model, by the size of their scope, then by factor order. */
export function enumerateTerms(factors: readonly BalancedFactor[]): { own: number; scope: number }[] {
  const m = factors.length;
  const anc = factors.map((_, i) => ancestry(factors, i));
  const out: { own: number; scope: number }[] = [];
  for (let own = 1; own < 1 << m; own++) {
    const members = bits(own, m);
    // No own factor may be an ancestor of another own factor.
    if (members.some((a) => members.some((b) => a !== b && ((anc[b]! >> a) & 1) === 1))) continue;
    let scope = 0;
    for (const i of members) scope |= anc[i]!;
    out.push({ own, scope });
  }
  const order = (mask: number) => bits(mask, m);
  out.sort((a, b) => {
    const sa = order(a.scope).length;
    const sb = order(b.scope).length;
    if (sa !== sb) return sa - sb;
    const oa = order(a.own);
    const ob = order(b.own);
    if (oa.length !== ob.length) return oa.length - ob.length;
    for (let i = 0; i < oa.length; i++) if (oa[i] !== ob[i]) return oa[i]! - ob[i]!;
    return a.scope - b.scope;
  });
  return out;
}

/**
 * The ANOVA of a balanced crossed/nested design. Fails with a reason when the layout is not balanced
 * (a finest cell with a different number of runs, including none), a code is out of range, or the
 * nesting has a cycle.
 */
export function balancedAnova(data: BalancedData): BalancedAnova | BalancedFailure {
  const { factors, codes, y } = data;
  const m = factors.length;
  const n = y.length;
  if (m === 0 || m > 16) return { ok: false, reason: "the balanced analysis handles 1 to 16 factors" };
  for (let i = 0; i < m; i++) {
    if (hasNestingCycle(factors, i)) return { ok: false, reason: "the nesting of the factors has a cycle" };
    if (factors[i]!.levels < 1 || codes[i]!.length !== n) return { ok: false, reason: "every factor needs a level for every run" };
  }
  const cells = factors.reduce((a, f) => a * f.levels, 1);
  if (cells > 1_000_000) return { ok: false, reason: "too many cells for the balanced analysis" };
  const counts = new Int32Array(cells);
  const sums = new Float64Array(cells);
  for (let r = 0; r < n; r++) {
    let cell = 0;
    for (let i = 0; i < m; i++) {
      const c = codes[i]![r]!;
      if (c < 0 || c >= factors[i]!.levels) return { ok: false, reason: "a level code is out of range" };
      cell = cell * factors[i]!.levels + c;
    }
    counts[cell]!++;
    sums[cell]! += y[r]!;
  }
  const reps = counts[0]!;
  if (reps === 0 || counts.some((c) => c !== reps)) return { ok: false, reason: "the design is not balanced: every combination of levels needs the same number of runs" };
  const cellMeans = sums.map((s) => s / reps);

  // Marginal means over any set of factors, indexed by mixed radix over the set in factor order.
  const marginal = new Map<number, Float64Array>();
  const marginalOf = (mask: number): Float64Array => {
    const cached = marginal.get(mask);
    if (cached) return cached;
    const members = bits(mask, m);
    const size = members.reduce((a, i) => a * factors[i]!.levels, 1);
    const acc = new Float64Array(size);
    const coord = new Int32Array(m);
    for (let cell = 0; cell < cells; cell++) {
      let rest = cell;
      for (let i = m - 1; i >= 0; i--) {
        coord[i] = rest % factors[i]!.levels;
        rest = Math.floor(rest / factors[i]!.levels);
      }
      let idx = 0;
      for (const i of members) idx = idx * factors[i]!.levels + coord[i]!;
      acc[idx]! += cellMeans[cell]!;
    }
    const per = cells / size;
    for (let i = 0; i < size; i++) acc[i]! /= per;
    marginal.set(mask, acc);
    return acc;
  };

  const all = (1 << m) - 1;
  const terms: BalancedTerm[] = [];
  for (const { own, scope } of enumerateTerms(factors)) {
    const scopeMembers = bits(scope, m);
    const ownMembers = bits(own, m);
    const size = scopeMembers.reduce((a, i) => a * factors[i]!.levels, 1);
    const subsetsOfOwn: number[] = [];
    for (let v = 0; v < 1 << ownMembers.length; v++) {
      let mask = scope & ~own;
      ownMembers.forEach((f, j) => {
        if ((v >> j) & 1) mask |= 1 << f;
      });
      subsetsOfOwn.push(mask);
    }
    const signs = subsetsOfOwn.map((_, v) => ((ownMembers.length - popcount(v)) % 2 === 0 ? 1 : -1));
    const tables = subsetsOfOwn.map(marginalOf);
    const coord = new Int32Array(m);
    let sumSq = 0;
    for (let idx = 0; idx < size; idx++) {
      let rest = idx;
      for (let j = scopeMembers.length - 1; j >= 0; j--) {
        const f = scopeMembers[j]!;
        coord[f] = rest % factors[f]!.levels;
        rest = Math.floor(rest / factors[f]!.levels);
      }
      let effect = 0;
      subsetsOfOwn.forEach((mask, v) => {
        let k = 0;
        for (const f of scopeMembers) if ((mask >> f) & 1) k = k * factors[f]!.levels + coord[f]!;
        effect += signs[v]! * tables[v]![k]!;
      });
      sumSq += effect * effect;
    }
    const ss = (n / size) * sumSq;
    let df = 1;
    for (const f of ownMembers) df *= factors[f]!.levels - 1;
    for (const f of bits(scope & ~own, m)) df *= factors[f]!.levels;
    const random = scopeMembers.some((f) => factors[f]!.random);
    terms.push({ name: balancedTermName(factors, own, scope), own, scope, random, df, ss });
  }

  let grand = 0;
  for (const v of y) grand += v;
  grand /= n;
  let totalSs = 0;
  let withinSs = 0;
  for (let r = 0; r < n; r++) {
    totalSs += (y[r]! - grand) ** 2;
    let cell = 0;
    for (let i = 0; i < m; i++) cell = cell * factors[i]!.levels + codes[i]![r]!;
    withinSs += (y[r]! - cellMeans[cell]!) ** 2;
  }
  let residual = { df: n - cells, ss: withinSs };
  let kept = terms;
  if (reps === 1) {
    const top = terms.find((t) => t.scope === all && bits(t.own, m).every((f) => !factors.some((g) => g.parent === f)));
    if (top) {
      residual = { df: top.df, ss: top.ss };
      kept = terms.filter((t) => t !== top);
    }
  }
  return { ok: true, n, replicates: reps, terms: kept, residual, total: { df: n - 1, ss: totalSs } };
}

function hasNestingCycle(factors: readonly BalancedFactor[], f: number): boolean {
  let cur = factors[f]!.parent;
  for (let steps = 0; steps <= factors.length; steps++) {
    if (cur === undefined) return false;
    if (cur === f || cur < 0 || cur >= factors.length) return true;
    cur = factors[cur]!.parent;
  }
  return true;
}

/** Number of set bits of a term mask (how many factors a term involves). */
export function popcount(v: number): number {
  let c = 0;
  while (v) {
    v &= v - 1;
    c++;
  }
  return c;
}
