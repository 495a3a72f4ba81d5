/**
 * An interpolation table for a smooth function that rises from 0 at x = 0 to 1 at x = `top` and stays 1
 * beyond (a probability as a function of a scaled bound: the range of normals, Dunnett's inner
 * probability), with its slope. Such a function is asked for at hundreds of points per outer integral
 * and at many more per quantile, always with the same shape parameters, while each direct value is an
 * integral of its own: the table is filled once per shape, one interval of width `width` at a time when
 * first needed, at `NODES_PER_INTERVAL` Chebyshev points of the first kind, and read by the barycentric
 * formula (Berrut & Trefethen 2004, "Barycentric Lagrange interpolation", SIAM Review 46, 501-517), which
 * is exact at the nodes; in between the error falls with about the 16th power of the width. Each user
 * chooses the width for its function and states and tests its accuracy.
 */

/** A value and its slope. */
export interface ValueAndSlope {
  value: number;
  slope: number;
}

export interface StepTable {
  /** From here on the function is 1 and its slope 0. */
  readonly top: number;
  /** The width of each interval. */
  readonly width: number;
  readonly evaluate: (x: number, out: ValueAndSlope) => void;
  /** Per interval: 1 once its nodes are filled. */
  readonly filled: Uint8Array;
  readonly nodes: Float64Array;
  readonly values: Float64Array;
  readonly slopes: Float64Array;
}

const NODES_PER_INTERVAL = 16;
const CHEBYSHEV_T = Float64Array.from({ length: NODES_PER_INTERVAL }, (_, j) => Math.cos(((2 * j + 1) * Math.PI) / (2 * NODES_PER_INTERVAL)));
const BARYCENTRIC = Float64Array.from({ length: NODES_PER_INTERVAL }, (_, j) => (j % 2 === 0 ? 1 : -1) * Math.sin(((2 * j + 1) * Math.PI) / (2 * NODES_PER_INTERVAL)));

/** An empty table for `evaluate` on [0, top) in intervals of `width` (top rounded up to a whole number of them). */
export function stepTable(top: number, width: number, evaluate: (x: number, out: ValueAndSlope) => void): StepTable {
  const intervals = Math.max(1, Math.ceil(top / width));
  const size = intervals * NODES_PER_INTERVAL;
  return { top: intervals * width, width, evaluate, filled: new Uint8Array(intervals), nodes: new Float64Array(size), values: new Float64Array(size), slopes: new Float64Array(size) };
}

function fill(table: StepTable, m: number): void {
  const out: ValueAndSlope = { value: 0, slope: 0 };
  for (let j = 0; j < NODES_PER_INTERVAL; j++) {
    const at = m * NODES_PER_INTERVAL + j;
    const x = (m + 0.5 * (1 + CHEBYSHEV_T[j]!)) * table.width;
    table.evaluate(x, out);
    table.nodes[at] = x;
    table.values[at] = out.value;
    table.slopes[at] = out.slope;
  }
  table.filled[m] = 1;
}

/** The function and its slope at x >= 0, from the table (filling the interval of x when first needed). */
export function interpolateStep(table: StepTable, x: number, out: ValueAndSlope): void {
  if (x >= table.top) {
    out.value = 1;
    out.slope = 0;
    return;
  }
  const m = Math.floor(x / table.width);
  if (table.filled[m] === 0) fill(table, m);
  const base = m * NODES_PER_INTERVAL;
  let numerator = 0;
  let slope = 0;
  let denominator = 0;
  for (let j = 0; j < NODES_PER_INTERVAL; j++) {
    const difference = x - table.nodes[base + j]!;
    if (difference === 0) {
      out.value = table.values[base + j]!;
      out.slope = table.slopes[base + j]!;
      return;
    }
    const term = BARYCENTRIC[j]! / difference;
    numerator += term * table.values[base + j]!;
    slope += term * table.slopes[base + j]!;
    denominator += term;
  }
  out.value = numerator / denominator;
  out.slope = slope / denominator;
}
