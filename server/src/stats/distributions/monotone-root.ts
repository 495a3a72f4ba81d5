/**
 * Safeguarded Newton iteration for an increasing function of one variable, shared by the quantile
 * functions. The quantile problems are posed on a log scale (u = ln|t| or ln f, h = difference of log
 * tail probabilities), where the tails are nearly linear, so Newton converges in a few steps; a bracket
 * kept from the signs seen so far (as in Press et al., Numerical Recipes 3rd ed. 2007, §9.4, "rtsafe")
 * guards against overshoot, with bisection once both ends are known and step doubling until then.
 */

/** The value and derivative of the function whose root is sought, at one point. */
export interface ValueAndSlope {
  /** h(u). */
  readonly value: number;
  /** h'(u); any positive approximation still converges, only more slowly. */
  readonly slope: number;
}

/**
 * Returns u with h(u) = 0 for an increasing h, starting from `start`, to an absolute tolerance in u of
 * about `tolerance`. Returns NaN if h gives NaN. Stops after 200 evaluations with the best point so far.
 */
export function solveIncreasing(h: (u: number) => ValueAndSlope, start: number, tolerance: number): number {
  let lo = -Infinity;
  let hi = Infinity;
  let u = start;
  let expansion = 1;
  for (let iteration = 0; iteration < 200; iteration++) {
    const { value, slope } = h(u);
    if (Number.isNaN(value)) return NaN;
    if (value === 0) return u;
    if (value < 0) lo = u;
    else hi = u;
    let next = u - value / slope;
    if (!(next > lo && next < hi)) {
      if (Number.isFinite(lo) && Number.isFinite(hi)) {
        next = 0.5 * (lo + hi);
      } else {
        next = value < 0 ? u + expansion : u - expansion;
        expansion *= 2;
      }
    }
    if (Math.abs(next - u) <= tolerance) return next;
    if (Number.isFinite(lo) && Number.isFinite(hi) && hi - lo <= tolerance) return 0.5 * (lo + hi);
    u = next;
  }
  return u;
}
