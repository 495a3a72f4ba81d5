/**
 * Householder QR decomposition of a column-major design matrix with rank detection, and the
 * least-squares quantities derived from it.
 *
 * Method: Householder reflections applied column by column in the given column order (Golub & Van
 * Loan, Matrix Computations, 4th ed. 2013, Algorithm 5.2.1, with the reflector of Algorithm 5.1.1 in
 * the LAPACK `dlarfg` normalisation v[0] = 1). Before column j is reduced, its norm below the current
 * rank is compared with its original norm; when it falls below `tolerance` times the original norm the
 * column is numerically a combination of earlier columns (Golub & Van Loan section 5.4.1 on rank
 * deficiency) and is marked aliased instead of being reduced. Keeping the given order, rather than
 * pivoting on the largest norm, makes the aliased column always the later one, which is what a model
 * with ordered terms needs. The normal equations are never formed, so the condition number enters the
 * solution once, not squared.
 */

/** A decomposition X = Q R of the non-aliased columns of X (n rows, p columns, column-major). */
export interface QrDecomposition {
  readonly n: number;
  readonly p: number;
  /** Number of non-aliased columns. */
  readonly rank: number;
  /** `columnOfRank[k]` is the column reduced at rank position k (k < rank). */
  readonly columnOfRank: Int32Array;
  /** `rankOfColumn[j]` is column j's rank position, or -1 when column j is aliased. */
  readonly rankOfColumn: Int32Array;
  /**
   * The reduced matrix: for a non-aliased column j at rank position k, rows 0..k hold column j of R
   * and rows k+1..n-1 the Householder vector (its leading 1 implied). For an aliased column detected at
   * rank position k, rows 0..k-1 hold Q^T x_j (its coordinates on the earlier columns' Q columns).
   */
  readonly reduced: Float64Array;
  /** Householder scalars tau by rank position: H_k = I - tau_k v_k v_k^T. */
  readonly tau: Float64Array;
}

/** Default relative tolerance for aliasing: the one R's `lm` uses (1e-7), comfortably above rounding. */
export const DEFAULT_ALIAS_TOLERANCE = 1e-7;

/**
 * Decomposes the n x p column-major matrix `x` (which is not modified). A column whose norm after
 * removing its projection on the earlier non-aliased columns is at most `tolerance` times its
 * original norm (or which is zero) is aliased.
 */
export function householderQr(x: Float64Array, n: number, p: number, tolerance = DEFAULT_ALIAS_TOLERANCE): QrDecomposition {
  const a = Float64Array.from(x.subarray(0, n * p));
  const columnOfRank = new Int32Array(Math.min(n, p));
  const rankOfColumn = new Int32Array(p).fill(-1);
  const tau = new Float64Array(Math.min(n, p));
  let rank = 0;
  for (let j = 0; j < p; j++) {
    const col = j * n;
    const originalNorm = norm2(x, col, col + n);
    if (rank >= n) continue;
    const remaining = norm2(a, col + rank, col + n);
    if (originalNorm === 0 || remaining <= tolerance * originalNorm) continue;
    // dlarfg: beta = -sign(alpha) * ||x||, v = x / (alpha - beta), tau = (beta - alpha) / beta.
    const k = rank;
    const alpha = a[col + k]!;
    const beta = alpha >= 0 ? -remaining : remaining;
    const scale = 1 / (alpha - beta);
    for (let i = k + 1; i < n; i++) a[col + i]! *= scale;
    a[col + k] = beta;
    const t = (beta - alpha) / beta;
    tau[k] = t;
    // Apply H_k to every later column (rows k..n-1).
    for (let jj = j + 1; jj < p; jj++) {
      const c2 = jj * n;
      let s = a[c2 + k]!;
      for (let i = k + 1; i < n; i++) s += a[col + i]! * a[c2 + i]!;
      s *= t;
      a[c2 + k]! -= s;
      for (let i = k + 1; i < n; i++) a[c2 + i]! -= s * a[col + i]!;
    }
    columnOfRank[k] = j;
    rankOfColumn[j] = k;
    rank++;
  }
  return { n, p, rank, columnOfRank: columnOfRank.slice(0, rank), rankOfColumn, reduced: a, tau: tau.slice(0, rank) };
}

/** Returns Q^T y for a vector of length n (a new array; `y` is not modified). */
export function applyQTranspose(qr: QrDecomposition, y: Float64Array): Float64Array {
  const z = Float64Array.from(y);
  for (let k = 0; k < qr.rank; k++) reflect(qr, k, z);
  return z;
}

/** Returns Q z for a vector of length n (a new array; `z` is not modified). */
export function applyQ(qr: QrDecomposition, z: Float64Array): Float64Array {
  const w = Float64Array.from(z);
  for (let k = qr.rank - 1; k >= 0; k--) reflect(qr, k, w);
  return w;
}

/** The least-squares solution and its by-products for one response vector. */
export interface LeastSquaresFit {
  /** Coefficients by column; an aliased column's coefficient is 0 (it is not estimable). */
  readonly coefficients: Float64Array;
  /** Q^T y: its first `rank` entries are the effects of the columns in rank order. */
  readonly effects: Float64Array;
  /** Residual sum of squares: the sum of the squared effects beyond the rank (no subtraction). */
  readonly residualSs: number;
  readonly residuals: Float64Array;
  readonly fitted: Float64Array;
}

/** Solves min ||y - X b|| using the decomposition. Residuals are Q applied to the trailing effects. */
export function leastSquares(qr: QrDecomposition, y: Float64Array): LeastSquaresFit {
  const { n, p, rank } = qr;
  const effects = applyQTranspose(qr, y);
  let residualSs = 0;
  for (let i = rank; i < n; i++) residualSs += effects[i]! * effects[i]!;
  const tail = new Float64Array(n);
  for (let i = rank; i < n; i++) tail[i] = effects[i]!;
  const residuals = applyQ(qr, tail);
  const fitted = new Float64Array(n);
  for (let i = 0; i < n; i++) fitted[i] = y[i]! - residuals[i]!;
  const coefficients = new Float64Array(p);
  const solved = solveUpper(qr, effects.subarray(0, rank));
  for (let k = 0; k < rank; k++) coefficients[qr.columnOfRank[k]!] = solved[k]!;
  return { coefficients, effects, residualSs, residuals, fitted };
}

/** Diagonal of the hat matrix H = Q_1 Q_1^T: h_i is the squared norm of row i of the first `rank` columns of Q. */
export function hatDiagonal(qr: QrDecomposition): Float64Array {
  const { n, rank } = qr;
  const h = new Float64Array(n);
  const e = new Float64Array(n);
  for (let k = 0; k < rank; k++) {
    e.fill(0);
    e[k] = 1;
    // H_m leaves e_k unchanged for m > k, so Q e_k needs only reflectors k..0.
    for (let m = k; m >= 0; m--) reflect(qr, m, e);
    for (let i = 0; i < n; i++) h[i]! += e[i]! * e[i]!;
  }
  return h;
}

/**
 * Solves R^T z = c for z, where c is given by rank position (length rank). For a linear combination
 * l of the non-aliased coefficients, Var(l^T b) = sigma^2 ||z||^2 with c = l in rank order, which avoids
 * forming (X^T X)^{-1}.
 */
export function solveUpperTransposed(qr: QrDecomposition, c: Float64Array): Float64Array {
  const { n, rank } = qr;
  const z = new Float64Array(rank);
  for (let k = 0; k < rank; k++) {
    const col = qr.columnOfRank[k]! * n;
    let s = c[k]!;
    for (let m = 0; m < k; m++) s -= qr.reduced[col + m]! * z[m]!;
    z[k] = s / qr.reduced[col + k]!;
  }
  return z;
}

/**
 * For an aliased column j, the coefficients c (by rank position, over the non-aliased columns reduced
 * before j) with x_j = sum_k c_k x_{columnOfRank[k]} up to the tolerance; null for a non-aliased column.
 * A linear function l^T b is estimable exactly when l agrees with every such relation.
 */
export function aliasRelation(qr: QrDecomposition, j: number): Float64Array | null {
  if (qr.rankOfColumn[j]! >= 0) return null;
  // Rows 0..k-1 of the aliased column hold Q^T x_j for the columns reduced before it.
  let k = 0;
  while (k < qr.rank && qr.columnOfRank[k]! < j) k++;
  const top = new Float64Array(qr.rank);
  for (let m = 0; m < k; m++) top[m] = qr.reduced[j * qr.n + m]!;
  const c = solveUpper({ ...qr, rank: k }, top.subarray(0, k));
  const full = new Float64Array(qr.rank);
  full.set(c);
  return full;
}

function solveUpper(qr: QrDecomposition, rhs: Float64Array): Float64Array {
  const { n, rank } = qr;
  const b = Float64Array.from(rhs.subarray(0, rank));
  for (let k = rank - 1; k >= 0; k--) {
    const col = qr.columnOfRank[k]! * n;
    b[k] = b[k]! / qr.reduced[col + k]!;
    const bk = b[k]!;
    for (let m = 0; m < k; m++) b[m]! -= qr.reduced[col + m]! * bk;
  }
  return b;
}

function reflect(qr: QrDecomposition, k: number, z: Float64Array): void {
  const { n } = qr;
  const col = qr.columnOfRank[k]! * n;
  const v = qr.reduced;
  let s = z[k]!;
  for (let i = k + 1; i < n; i++) s += v[col + i]! * z[i]!;
  s *= qr.tau[k]!;
  if (s === 0) return;
  z[k]! -= s;
  for (let i = k + 1; i < n; i++) z[i]! -= s * v[col + i]!;
}

/** Euclidean norm of a[from..to) with scaling against overflow and underflow (as in LAPACK dnrm2). */
function norm2(a: Float64Array, from: number, to: number): number {
  let scale = 0;
  let ssq = 1;
  for (let i = from; i < to; i++) {
    const v = a[i]!;
    if (v !== 0) {
      const av = Math.abs(v);
      if (scale < av) {
        ssq = 1 + ssq * (scale / av) * (scale / av);
        scale = av;
      } else {
        ssq += (av / scale) * (av / scale);
      }
    }
  }
  return scale * Math.sqrt(ssq);
}
