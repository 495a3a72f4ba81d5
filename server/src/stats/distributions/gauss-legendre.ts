/**
 * Gauss-Legendre quadrature nodes and weights on [-1, 1], computed by Newton's method on the Legendre
 * polynomial P_n with the three-term recurrence (Press et al., Numerical Recipes, 3rd ed. 2007, §4.6,
 * routine gauleg). An n-point rule integrates polynomials of degree 2n - 1 exactly.
 */

/** Nodes and weights of an n-point rule on [-1, 1], nodes in increasing order. */
export interface QuadratureRule {
  readonly nodes: Float64Array;
  readonly weights: Float64Array;
}

/** Returns the n-point Gauss-Legendre rule on [-1, 1] (n >= 1). */
export function gaussLegendre(n: number): QuadratureRule {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  const m = Math.floor((n + 1) / 2);
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let derivative = 0;
    for (let iteration = 0; iteration < 100; iteration++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      derivative = (n * (z * p1 - p2)) / (z * z - 1);
      const step = p1 / derivative;
      z -= step;
      if (Math.abs(step) < 1e-15) break;
    }
    nodes[i] = -z;
    nodes[n - 1 - i] = z;
    weights[i] = weights[n - 1 - i] = 2 / ((1 - z * z) * derivative * derivative);
  }
  return { nodes, weights };
}
