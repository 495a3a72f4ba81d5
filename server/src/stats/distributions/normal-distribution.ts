/**
 * Standard normal distribution: density, lower tail, upper tail and quantile.
 *
 * Method: the tails use W. J. Cody's rational Chebyshev approximations (Cody 1969, "Rational Chebyshev
 * approximations for the error function", Math. Comp. 23, 631-637; coefficients as published with his
 * ANORM routine), on |z| <= 0.66291, |z| <= √32 and |z| < 50, each accurate to about 1e-16 relative.
 * The Gaussian factor exp(-z²/2) is split as exp(-s²/2)·exp(-(z-s)(z+s)/2) with s = z rounded down to a
 * multiple of 1/16, so that the rounding of z² does not cost relative accuracy in the far tail.
 * The quantile is Wichura's (1988) algorithm AS 241 (PPND16, Applied Statistics 37, 477-484),
 * accurate to about 1e-16 relative.
 */

const INV_SQRT_2PI = 0.39894228040143267793994605993438;
const SQRT_32 = 5.656854249492380195206754896838;

const A = [2.2352520354606839287, 161.02823106855587881, 1067.6894854603709582, 18154.981253343561249, 0.065682337918207449113];
const B = [47.20258190468824187, 976.09855173777669322, 10260.932208618978205, 45507.789335026729956];
const C = [
  0.39894151208813466764, 8.8831497943883759412, 93.506656132177855979, 597.27027639480026226,
  2494.5375852903726711, 6848.1904505362823326, 11602.651437647350124, 9842.7148383839780218,
  1.0765576773720192317e-8,
];
const D = [
  22.266688044328115691, 235.38790178262499861, 1519.377599407554805, 6485.558298266760755,
  18615.571640885098091, 34900.952721145977266, 38912.003286093271411, 19685.429676859990727,
];
const P = [0.21589853405795699, 0.1274011611602473639, 0.022235277870649807, 0.001421619193227893466, 2.9112874951168792e-5, 0.02307344176494017303];
const Q = [1.28426009614491121, 0.468238212480865118, 0.0659881378689285515, 0.00378239633202758244, 7.29751555083966205e-5];

/** Returns the standard normal density φ(z). */
export function normalDensity(z: number): number {
  return INV_SQRT_2PI * Math.exp(-0.5 * z * z);
}

/**
 * Returns P(Z <= z) for a standard normal Z. Accurate to about 1e-15 relative, also deep in the lower
 * tail (down to the underflow threshold near z = -38.5). Returns NaN for NaN; ±Infinity give 1 and 0.
 */
export function normalCdf(z: number): number {
  return normalUpperTail(-z);
}

/**
 * Returns P(Z > z) for a standard normal Z, computed directly (never as 1 - cdf), accurate to about
 * 1e-15 relative for all z up to the underflow threshold near z = 38.5. Returns NaN for NaN.
 */
export function normalUpperTail(z: number): number {
  if (Number.isNaN(z)) return NaN;
  const y = Math.abs(z);
  if (y <= 0.66291) {
    const xsq = y > 1.1e-16 ? z * z : 0;
    let num = A[4] * xsq;
    let den = xsq;
    for (let i = 0; i < 3; i++) {
      num = (num + A[i]) * xsq;
      den = (den + B[i]) * xsq;
    }
    return 0.5 - (z * (num + A[3])) / (den + B[3]);
  }
  let farTail: number;
  if (y <= SQRT_32) {
    let num = C[8] * y;
    let den = y;
    for (let i = 0; i < 7; i++) {
      num = (num + C[i]) * y;
      den = (den + D[i]) * y;
    }
    farTail = ((num + C[7]) / (den + D[7])) * gaussianFactor(y);
  } else if (y < 50) {
    const xsq = 1 / (y * y);
    let num = P[5] * xsq;
    let den = xsq;
    for (let i = 0; i < 4; i++) {
      num = (num + P[i]) * xsq;
      den = (den + Q[i]) * xsq;
    }
    const ratio = (xsq * (num + P[4])) / (den + Q[4]);
    farTail = ((INV_SQRT_2PI - ratio) / y) * gaussianFactor(y);
  } else {
    farTail = 0;
  }
  return z > 0 ? farTail : 1 - farTail;
}

/**
 * Returns the z with P(Z <= z) = p (Wichura 1988, AS 241). Returns -Infinity for p = 0, Infinity for
 * p = 1 and NaN for p outside [0, 1] or NaN.
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (
      (q *
        (((((((2509.0809287301226727 * r + 33430.575583588128105) * r + 67265.770927008700853) * r +
          45921.953931549871457) * r + 13731.693765509461125) * r + 1971.5909503065514427) * r +
          133.14166789178437745) * r + 3.387132872796366608)) /
      (((((((5226.495278852854561 * r + 28729.085735721942674) * r + 39307.89580009271061) * r +
        21213.794301586595867) * r + 5394.1960214247511077) * r + 687.1870074920579083) * r +
        42.313330701600911252) * r + 1)
    );
  }
  // The smaller tail area is exact here: for p >= 0.5, 1 - p is computed without rounding (Sterbenz).
  let r = q < 0 ? p : 1 - p;
  r = Math.sqrt(-Math.log(r));
  let value: number;
  if (r <= 5) {
    r -= 1.6;
    value =
      (((((((7.7454501427834140764e-4 * r + 0.0227238449892691845833) * r + 0.24178072517745061177) * r +
        1.27045825245236838258) * r + 3.64784832476320460504) * r + 5.7694972214606914055) * r +
        4.6303378461565452959) * r + 1.42343711074968357734) /
      (((((((1.05075007164441684324e-9 * r + 5.475938084995344946e-4) * r + 0.0151986665636164571966) * r +
        0.14810397642748007459) * r + 0.68976733498510000455) * r + 1.6763848301838038494) * r +
        2.05319162663775882187) * r + 1);
  } else {
    r -= 5;
    value =
      (((((((2.01033439929228813265e-7 * r + 2.71155556874348757815e-5) * r + 0.0012426609473880784386) * r +
        0.026532189526576123093) * r + 0.29656057182850489123) * r + 1.7848265399172913358) * r +
        5.4637849111641143699) * r + 6.6579046435011037772) /
      (((((((2.04426310338993978564e-15 * r + 1.4215117583164458887e-7) * r + 1.8463183175100546818e-5) * r +
        7.868691311456132591e-4) * r + 0.0148753612908506148525) * r + 0.13692988092273580531) * r +
        0.59983220655588793769) * r + 1);
  }
  return q < 0 ? -value : value;
}

/** exp(-y²/2) evaluated as exp(-s²/2)·exp(-(y-s)(y+s)/2) with s = floor(16y)/16 (Cody's device). */
function gaussianFactor(y: number): number {
  const s = Math.floor(y * 16) / 16;
  const del = (y - s) * (y + s);
  return Math.exp(-s * s * 0.5) * Math.exp(-del * 0.5);
}
